import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fieldErrorsOf } from '../api/client';
import { signInInputSchema, useSignInMutation } from '../queries/me';
import { spacing } from '../theme';
import { Button, Field, Notice, Text, zodFieldErrors } from '../ui';
import { AuthFrame } from './AuthFrame';

const fields = ['email', 'password'] as const;

export function SignInForm() {
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const signIn = useSignInMutation();
  const server = fieldErrorsOf(signIn.error, fields);
  const errors = { ...server.fields, ...localErrors };

  const submit = () => {
    const parsed = signInInputSchema.safeParse({ email, password });
    if (!parsed.success) {
      setLocalErrors(zodFieldErrors(parsed.error));
      return;
    }
    setLocalErrors({});
    // On success the session's user lands in the cache and the auth gate moves on.
    signIn.mutate(parsed.data);
  };

  return (
    <AuthFrame title="Sign in" subtitle="Open your lab's requests, plans and machines." testID="sign-in-screen">
      <View style={styles.form} role="form" accessibilityLabel="Sign in">
        {server.form ? (
          <Notice tone="danger" testID="sign-in-error">
            {server.form}
          </Notice>
        ) : null}
        <Field
          label="E-mail"
          testID="sign-in-email"
          value={email}
          onChangeText={(t) => {
            setEmail(t);
            setLocalErrors(({ email: _e, ...rest }) => rest);
          }}
          error={errors.email}
          autoCapitalize="none"
          autoComplete="email"
          keyboardType="email-address"
          inputMode="email"
          returnKeyType="next"
        />
        <Field
          label="Password"
          testID="sign-in-password"
          value={password}
          onChangeText={(t) => {
            setPassword(t);
            setLocalErrors(({ password: _p, ...rest }) => rest);
          }}
          error={errors.password}
          secureTextEntry
          autoComplete="current-password"
          returnKeyType="go"
          onSubmitEditing={submit}
        />
        <Button label="Sign in" testID="sign-in-submit" onPress={submit} loading={signIn.isPending} fullWidth />
        <Link href="/forgot-password" testID="go-forgot-password" accessibilityRole="link">
          <Text variant="body" color="ember">
            Forgot your password?
          </Text>
        </Link>
      </View>
      <View style={styles.alt}>
        <Text variant="body" color="inkMuted">
          Starting a new lab?
        </Text>
        <Link href="/sign-up" testID="go-sign-up" accessibilityRole="link">
          <Text variant="bodyStrong" color="ember">
            Create a lab
          </Text>
        </Link>
      </View>
      <Text variant="caption" color="inkFaint">
        Joining an existing lab? Open the invite link a lead sent to your e-mail.
      </Text>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.lg },
  alt: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap', alignItems: 'center' },
});
