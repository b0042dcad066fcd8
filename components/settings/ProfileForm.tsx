import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { fieldErrorsOf, isApiError } from '../api/client';
import { spacing, useIsWide } from '../theme';
import { Button, Card, Field, Notice, Text, TextInput } from '../ui';
import { profileErrors, profileFrom, withCurrency, type FieldGroup, type FieldSpec, type FormValues } from './profileForm';
import { useLab } from '../lab/useCurrentLab';
import { useLabCurrency } from '../queries/account';

export type ProfileFormProps<P> = {
  groups: FieldGroup[];
  schema: z.ZodType<P>;
  initial: FormValues;
  readOnly?: boolean;
  submitLabel: string;
  /** "machine" gives testIDs machine-field-<key>, machine-save. */
  testIDPrefix: string;
  onSubmit: (profile: P) => void;
  submitting?: boolean;
  serverError?: unknown;
  footer?: React.ReactNode;
};

/**
 * A profile form: grouped fields with units, checked by the shared schema
 * before it is sent, each problem shown under its own field.
 */
export function ProfileForm<P>({ groups, schema, initial, readOnly, submitLabel, testIDPrefix, onSubmit, submitting, serverError, footer }: ProfileFormProps<P>) {
  const currency = useLabCurrency(useLab().id);
  const [values, setValues] = useState<FormValues>(initial);
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const [touchedSinceServer, setTouchedSinceServer] = useState<Record<string, boolean>>({});
  const keys = groups.flatMap((g) => g.fields.map((f) => f.key));
  const server = fieldErrorsOf(serverError, keys);
  // A taken name comes back without a field on some paths; it always belongs to the name.
  if (isApiError(serverError) && serverError.code === 'name_taken' && !server.fields.name) {
    server.fields.name = serverError.message;
    server.form = undefined;
  }
  const serverFields = Object.fromEntries(Object.entries(server.fields).filter(([k]) => !touchedSinceServer[k]));
  const errors = { ...serverFields, ...localErrors };
  const wide = useIsWide();

  const set = (key: string, value: FormValues[string]) => {
    setValues((v) => ({ ...v, [key]: value }));
    setTouchedSinceServer((t) => ({ ...t, [key]: true }));
    if (localErrors[key]) setLocalErrors(({ [key]: _gone, ...rest }) => rest);
  };

  const submit = () => {
    const input = profileFrom(groups, values);
    const parsed = schema.safeParse(input);
    if (!parsed.success) {
      setLocalErrors(profileErrors(groups, parsed.error, input));
      return;
    }
    setLocalErrors({});
    setTouchedSinceServer({});
    onSubmit(parsed.data);
  };

  const problemCount = Object.keys(errors).length;

  return (
    <View style={styles.form} role="form" testID={`${testIDPrefix}-form`}>
      {server.form ? (
        <Notice tone="danger" testID={`${testIDPrefix}-form-error`}>
          {server.form}
        </Notice>
      ) : null}
      {groups.map((g) => (
        <Card key={g.title} title={g.title}>
          <View style={[styles.fields, wide && styles.fieldsWide]}>
            {g.fields.map((f) => (
              <View key={f.key} style={[styles.cell, wide && f.kind !== 'text' && styles.cellWide]}>
                {f.kind === 'triple' ? (
                  <TripleField spec={f} value={values[f.key] as [string, string, string]} onChange={(v) => set(f.key, v)} error={errors[f.key]} readOnly={readOnly} testID={`${testIDPrefix}-field-${f.key}`} />
                ) : (
                  <Field
                    label={f.label}
                    unit={f.unit && withCurrency(f.unit, currency)}
                    hint={readOnly ? undefined : f.hint}
                    value={values[f.key] as string}
                    onChangeText={(t) => set(f.key, t)}
                    error={errors[f.key]}
                    editable={!readOnly}
                    mono={f.kind !== 'text'}
                    inputMode={f.kind === 'number' ? 'decimal' : undefined}
                    testID={`${testIDPrefix}-field-${f.key}`}
                  />
                )}
              </View>
            ))}
          </View>
        </Card>
      ))}
      {readOnly ? null : (
        <View style={styles.actions}>
          <Button label={submitLabel} onPress={submit} loading={submitting} testID={`${testIDPrefix}-save`} />
          {problemCount > 0 ? (
            <Text variant="label" color="danger" testID={`${testIDPrefix}-problems`}>
              {problemCount === 1 ? 'One field needs a fix.' : `${problemCount} fields need a fix.`}
            </Text>
          ) : null}
        </View>
      )}
      {footer}
    </View>
  );
}

function TripleField({
  spec,
  value,
  onChange,
  error,
  readOnly,
  testID,
}: {
  spec: FieldSpec;
  value: [string, string, string];
  onChange: (v: [string, string, string]) => void;
  error?: string;
  readOnly?: boolean;
  testID: string;
}) {
  const axes = ['X', 'Y', 'Z'] as const;
  return (
    <View style={styles.triple}>
      <Text variant="label" color="inkMuted">
        {spec.label}
        {spec.unit ? <Text variant="caption" color="inkFaint">{`  ${spec.unit}`}</Text> : null}
      </Text>
      <View style={styles.tripleRow}>
        {axes.map((axis, i) => (
          <View key={axis} style={styles.axis}>
            <Text variant="caption" color="inkFaint" style={styles.axisLabel}>
              {axis}
            </Text>
            <TextInput
              testID={`${testID}-${axis.toLowerCase()}`}
              accessibilityLabel={`${spec.label} ${axis}`}
              value={value[i]}
              editable={!readOnly}
              mono
              inputMode="decimal"
              invalid={!!error}
              style={styles.axisInput}
              onChangeText={(t) => {
                const next = [...value] as [string, string, string];
                next[i] = t;
                onChange(next);
              }}
            />
          </View>
        ))}
      </View>
      {error ? (
        <Text variant="caption" color="danger" testID={`${testID}-error`} accessibilityRole="alert">
          {error}
        </Text>
      ) : !readOnly && spec.hint ? (
        <Text variant="caption" color="inkFaint">
          {spec.hint}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.lg },
  fields: { gap: spacing.lg },
  fieldsWide: { flexDirection: 'row', flexWrap: 'wrap', columnGap: spacing.xl },
  cell: {},
  cellWide: { flexBasis: 300, flexGrow: 1, maxWidth: 520 },
  triple: { gap: spacing.xs },
  tripleRow: { flexDirection: 'row', gap: spacing.sm },
  axis: { flex: 1, flexDirection: 'row', alignItems: 'center', gap: spacing.xs, minWidth: 0 },
  axisLabel: { width: 12 },
  axisInput: { flex: 1, minWidth: 0 },
  actions: { flexDirection: 'row', alignItems: 'center', gap: spacing.lg, flexWrap: 'wrap' },
});
