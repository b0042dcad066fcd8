import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fieldErrorsOf } from '../api/client';
import { signUpInputSchema, useSignUpMutation, type SignUpInput } from '../queries/me';
import { spacing } from '../theme';
import { Button, Field, Notice, Text, zodFieldErrors } from '../ui';
import { AuthFrame } from './AuthFrame';

const fields = ['email', 'password', 'name', 'labName'] as const;

export function SignUpForm() {
  const [values, setValues] = useState<SignUpInput>({ email: '', password: '', name: '', labName: '' });
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const signUp = useSignUpMutation();
  const server = fieldErrorsOf(signUp.error, fields);
  const errors = { ...server.fields, ...localErrors };
  const set = (key: keyof SignUpInput) => (text: string) => {
    setValues((v) => ({ ...v, [key]: text }));
    setLocalErrors(({ [key]: _gone, ...rest }) => rest);
  };

  const submit = () => {
    const parsed = signUpInputSchema.safeParse(values);
    if (!parsed.success) {
      setLocalErrors(zodFieldErrors(parsed.error));
      return;
    }
    setLocalErrors({});
    signUp.mutate(parsed.data);
  };

  return (
    <AuthFrame
      title="Create a lab"
      subtitle="You become its first member and hold every role: designer, planner, lead and operator. Invite the others from the lab's settings."
      testID="sign-up-screen"
    >
      <View style={styles.form} role="form" accessibilityLabel="Create a lab">
        {server.form ? (
          <Notice tone="danger" testID="sign-up-error">
            {server.form}
          </Notice>
        ) : null}
        <Field label="Your name" testID="sign-up-name" value={values.name} onChangeText={set('name')} error={errors.name} autoComplete="name" />
        <Field
          label="E-mail"
          testID="sign-up-email"
          value={values.email}
          onChangeText={set('email')}
          error={errors.email}
          autoCapitalize="none"
          autoComplete="email"
          keyboardType="email-address"
          inputMode="email"
        />
        <Field
          label="Password"
          hint="At least 10 characters."
          testID="sign-up-password"
          value={values.password}
          onChangeText={set('password')}
          error={errors.password}
          secureTextEntry
          autoComplete="new-password"
        />
        <Field
          label="Lab name"
          hint="The team's name as members will see it."
          testID="sign-up-lab-name"
          value={values.labName}
          onChangeText={set('labName')}
          error={errors.labName}
          returnKeyType="go"
          onSubmitEditing={submit}
        />
        <Button label="Create lab" testID="sign-up-submit" onPress={submit} loading={signUp.isPending} fullWidth />
      </View>
      <View style={styles.alt}>
        <Text variant="body" color="inkMuted">
          Already a member?
        </Text>
        <Link href="/sign-in" testID="go-sign-in" accessibilityRole="link">
          <Text variant="bodyStrong" color="ember">
            Sign in
          </Text>
        </Link>
      </View>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.lg },
  alt: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap', alignItems: 'center' },
});
