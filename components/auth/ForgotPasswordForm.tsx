import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { fieldErrorsOf } from '../api/client';
import { resetRequestInputSchema, useResetRequestMutation } from '../queries/account';
import { spacing } from '../theme';
import { Button, Field, Notice, Text, zodFieldErrors } from '../ui';
import { AuthFrame } from './AuthFrame';

/** Asks for a password reset link by e-mail. */
export function ForgotPasswordForm() {
  const [email, setEmail] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const ask = useResetRequestMutation();
  const server = fieldErrorsOf(ask.error, ['email'] as const);
  const errors = { ...server.fields, ...localErrors };

  const submit = () => {
    const parsed = resetRequestInputSchema.safeParse({ email });
    if (!parsed.success) {
      setLocalErrors(zodFieldErrors(parsed.error));
      return;
    }
    setLocalErrors({});
    ask.mutate(parsed.data.email);
  };

  return (
    <AuthFrame title="Forgot your password?" subtitle="We e-mail you a link to choose a new one." testID="forgot-screen">
      {ask.isSuccess ? (
        <Notice tone="success" title="Check your e-mail" testID="forgot-sent">
          {`If ${email.trim()} has a Sinterstack account, a link is on its way. It works once and for a limited time. Nothing arrived? Look in the spam folder, or ask again in a few minutes.`}
        </Notice>
      ) : (
        <View style={styles.form} role="form" accessibilityLabel="Ask for a reset link">
          {server.form ? (
            <Notice tone="danger" testID="forgot-error">
              {server.form}
            </Notice>
          ) : null}
          <Field
            label="E-mail"
            testID="forgot-email"
            value={email}
            onChangeText={(t) => {
              setEmail(t);
              setLocalErrors({});
            }}
            error={errors.email}
            autoCapitalize="none"
            autoComplete="email"
            keyboardType="email-address"
            inputMode="email"
            returnKeyType="send"
            onSubmitEditing={submit}
          />
          <Button label="Send the link" testID="forgot-submit" onPress={submit} loading={ask.isPending} fullWidth />
        </View>
      )}
      <Link href="/sign-in" testID="forgot-back" accessibilityRole="link">
        <Text variant="bodyStrong" color="ember">
          Back to sign in
        </Text>
      </Link>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({ form: { gap: spacing.lg } });
