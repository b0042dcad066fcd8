import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fieldErrorsOf } from '../api/client';
import { resetInputSchema, useResetMutation } from '../queries/account';
import { PASSWORD_MIN } from '../../shared/schemas/auth';
import { spacing } from '../theme';
import { Button, Field, Notice, Text, zodFieldErrors } from '../ui';
import { AuthFrame } from './AuthFrame';

/** Chooses a new password with the token from a mailed reset link. */
export function ResetPasswordForm({ token }: { token: string }) {
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const reset = useResetMutation(token);
  const server = fieldErrorsOf(reset.error, ['password', 'token'] as const);
  const errors = { ...server.fields, ...localErrors };

  const submit = () => {
    const parsed = resetInputSchema.safeParse({ password, repeat });
    if (!parsed.success) {
      setLocalErrors(zodFieldErrors(parsed.error));
      return;
    }
    setLocalErrors({});
    reset.mutate(parsed.data.password);
  };

  if (reset.isSuccess) {
    return (
      <AuthFrame title="Password changed" subtitle="Sign in with your new password." testID="reset-screen">
        <Notice tone="success" testID="reset-done">
          Your password is changed, and every session of your account was signed out, in case someone else had one.
        </Notice>
        <Link href="/sign-in" testID="reset-sign-in" accessibilityRole="link">
          <Text variant="bodyStrong" color="ember">
            Sign in
          </Text>
        </Link>
      </AuthFrame>
    );
  }

  return (
    <AuthFrame title="Choose a new password" subtitle={`At least ${PASSWORD_MIN} characters; a few unrelated words make a strong one.`} testID="reset-screen">
      <View style={styles.form} role="form" accessibilityLabel="Choose a new password">
        {errors.token ? (
          <Notice tone="danger" testID="reset-token-error">
            {errors.token}
          </Notice>
        ) : null}
        {server.form ? (
          <Notice tone="danger" testID="reset-error">
            {server.form}
          </Notice>
        ) : null}
        <Field
          label="New password"
          testID="reset-password"
          value={password}
          onChangeText={(t) => {
            setPassword(t);
            setLocalErrors(({ password: _p, ...rest }) => rest);
          }}
          error={errors.password}
          secureTextEntry
          autoComplete="new-password"
          returnKeyType="next"
        />
        <Field
          label="The same again"
          testID="reset-repeat"
          value={repeat}
          onChangeText={(t) => {
            setRepeat(t);
            setLocalErrors(({ repeat: _r, ...rest }) => rest);
          }}
          error={errors.repeat}
          secureTextEntry
          autoComplete="new-password"
          returnKeyType="go"
          onSubmitEditing={submit}
        />
        <Button label="Set the new password" testID="reset-submit" onPress={submit} loading={reset.isPending} fullWidth />
      </View>
      <Link href="/forgot-password" testID="reset-ask-again" accessibilityRole="link">
        <Text variant="body" color="ember">
          Ask for a new link
        </Text>
      </Link>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({ form: { gap: spacing.lg } });
