import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { currencySchema, minPackingDensitySchema, type LabSettingsView } from '../../shared/schemas/auth';
import { formatMoney } from '../ui/format';
import { useLab } from '../lab/useCurrentLab';
import { useLabSettingsQuery, useUpdateLabSettingsMutation } from '../queries/account';
import { spacing } from '../theme';
import { Button, Card, Choice, ErrorState, Field, LoadingState, Notice, Text } from '../ui';
import { SettingsScreen } from './SettingsScreen';

type Mode = 'default' | 'on' | 'off';

/** The lab's rules: whether a plan needs a second person's approval, and the currency its money is in. */
export function LabRulesSection() {
  const lab = useLab();
  const settings = useLabSettingsQuery(lab.id);
  const update = useUpdateLabSettingsMutation(lab.id);
  const s = settings.data;
  const mode: Mode | null = s ? (!s.secondApprovalSet ? 'default' : s.secondApproval ? 'on' : 'off') : null;

  return (
    <SettingsScreen title="Lab rules" subtitle="How work is released to the machines in this lab, what review flags, and the currency its money is in." testID="settings-rules">
      {settings.isPending ? <LoadingState label="Loading the lab's rules" /> : null}
      {settings.isError ? <ErrorState error={settings.error} onRetry={() => settings.refetch()} /> : null}
      {s ? (
        <Card
          title="A plan needs a second person's approval"
          subtitle="When on, the lead who sent a plan for review cannot approve it; another lead must. Sending a plan back stays open to every lead."
          testID="rules-second-approval"
        >
          <View style={styles.state}>
            <Text variant="bodyStrong" testID="rules-second-approval-state">
              {s.secondApproval ? 'On: another lead approves each plan' : 'Off: a lead may approve a plan they sent'}
            </Text>
            <Text variant="caption" color="inkMuted">
              {s.secondApprovalSet
                ? 'Chosen by a lead of this lab.'
                : `The default: on when a lab has more than one lead (this lab has ${s.leads}).`}
            </Text>
          </View>
          {lab.isLead ? (
            <Choice<Mode>
              label="Rule"
              value={mode}
              testID="rules-second-approval-choice"
              options={[
                { value: 'default', label: 'Default', testID: 'rules-second-approval-default' },
                { value: 'on', label: 'Always on', testID: 'rules-second-approval-on' },
                { value: 'off', label: 'Off', testID: 'rules-second-approval-off' },
              ]}
              disabled={update.isPending}
              onChange={(m) => update.mutate({ secondApproval: m === 'default' ? null : m === 'on' })}
            />
          ) : (
            <Text variant="caption" color="inkFaint">
              Only a lead changes the lab's rules.
            </Text>
          )}
          {s.leads < 2 && s.secondApproval ? (
            <Notice tone="caution" testID="rules-one-lead">
              This lab has one lead: their own plans wait until someone else is made a lead.
            </Notice>
          ) : null}
          {update.isError ? (
            <View style={styles.state}>
              <Notice tone="danger">{update.error.message}</Notice>
              <Button label="Try again" size="sm" variant="secondary" onPress={() => update.reset()} />
            </View>
          ) : null}
        </Card>
      ) : null}
      {s ? <CurrencyCard key={s.currency} settings={s} /> : null}
      {s ? <DensityCard key={`density:${s.minPackingDensityPercent}`} settings={s} /> : null}
    </SettingsScreen>
  );
}

/** The ISO 4217 code every amount of money in the lab is shown in (rates and prices are typed in it). */
function CurrencyCard({ settings }: { settings: LabSettingsView }) {
  const lab = useLab();
  const update = useUpdateLabSettingsMutation(lab.id);
  const [code, setCode] = useState(settings.currency);
  const [error, setError] = useState<string | null>(null);
  const save = () => {
    const parsed = currencySchema.safeParse(code);
    if (!parsed.success) return setError(`The currency ${parsed.error.issues[0].message}.`);
    setError(null);
    update.mutate({ currency: parsed.data });
  };
  return (
    <Card
      title="Currency"
      subtitle="Machine and labour rates, powder, energy and gas prices are typed in it, and every cost is shown in it."
      testID="rules-currency"
    >
      <Text variant="bodyStrong" testID="rules-currency-state">
        {`${settings.currency}: an amount of 1234.5 reads ${formatMoney(1234.5, settings.currency)}`}
      </Text>
      {lab.isLead ? (
        <View style={styles.state}>
          <Field
            label="ISO 4217 code"
            hint="Three letters, e.g. EUR, USD, CHF, GBP, JPY. Changing it does not convert the figures already typed."
            value={code}
            onChangeText={(t) => {
              setCode(t);
              setError(null);
            }}
            autoCapitalize="characters"
            maxLength={3}
            error={error ?? (update.isError ? update.error.message : undefined)}
            testID="rules-currency-code"
          />
          <Button label="Save currency" size="sm" testID="rules-currency-save" loading={update.isPending} disabled={code.trim().toUpperCase() === settings.currency} onPress={save} />
        </View>
      ) : (
        <Text variant="caption" color="inkFaint">
          Only a lead changes the lab's currency.
        </Text>
      )}
    </Card>
  );
}

/** The packing density below which review flags a plan: a build that wastes powder and machine time. */
function DensityCard({ settings }: { settings: LabSettingsView }) {
  const lab = useLab();
  const update = useUpdateLabSettingsMutation(lab.id);
  const [text, setText] = useState(String(settings.minPackingDensityPercent));
  const [error, setError] = useState<string | null>(null);
  const save = () => {
    const value = text.trim() === '' ? NaN : Number(text.replace(',', '.'));
    const parsed = minPackingDensitySchema.safeParse(Number.isFinite(value) ? value : text);
    if (!parsed.success) return setError(`The minimum ${parsed.error.issues[0].message}.`);
    setError(null);
    update.mutate({ minPackingDensityPercent: parsed.data });
  };
  const current = settings.minPackingDensityPercent;
  return (
    <Card
      title="Packing density at review"
      subtitle="The share of the powder cake filled with parts. A plan below the minimum is flagged when a lead reviews it."
      testID="rules-density"
    >
      <Text variant="bodyStrong" testID="rules-density-state">
        {current > 0 ? `Plans below ${current} % are flagged.` : 'Off: no plan is flagged for its density.'}
      </Text>
      {lab.isLead ? (
        <View style={styles.state}>
          <Field
            label="Minimum packing density (%)"
            hint="0 to 50; 0 turns the flag off. Powder-bed builds commonly pack 5 to 15 %."
            value={text}
            onChangeText={(t) => {
              setText(t);
              setError(null);
            }}
            keyboardType="decimal-pad"
            error={error ?? (update.isError ? update.error.message : undefined)}
            testID="rules-density-value"
          />
          <Button label="Save minimum" size="sm" testID="rules-density-save" loading={update.isPending} disabled={text.trim() === String(current)} onPress={save} />
        </View>
      ) : (
        <Text variant="caption" color="inkFaint">
          Only a lead changes the lab's rules.
        </Text>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({ state: { gap: spacing.xs } });
