/**
 * Outside the web there is nothing to drop onto: the system's document picker
 * chooses one or many mesh files.
 */
import * as DocumentPicker from 'expo-document-picker';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Button, Text } from '../ui';
import type { FileDropProps, PickedFile } from './types';

const MIME: Record<string, string> = { stl: 'model/stl', obj: 'model/obj', '3mf': 'model/3mf' };

export function FileDrop({ onFiles, disabled, accept, testID = 'file-drop', hint }: FileDropProps) {
  const [error, setError] = useState<string | null>(null);
  const choose = async () => {
    setError(null);
    try {
      // Mesh files have no dependable MIME type on every system, so any type is offered and the name decides.
      const result = await DocumentPicker.getDocumentAsync({ multiple: true, type: '*/*', copyToCacheDirectory: true });
      if (result.canceled) return;
      const files: PickedFile[] = [];
      const skipped: string[] = [];
      for (const a of result.assets) {
        const ext = a.name.toLowerCase().split('.').pop() ?? '';
        if (!accept.includes(`.${ext}`)) skipped.push(a.name);
        files.push({ name: a.name, sizeBytes: a.size ?? null, body: { uri: a.uri, name: a.name, type: a.mimeType ?? MIME[ext] ?? 'application/octet-stream' } });
      }
      // Files of other kinds still go up: the server's refusal names each one.
      if (skipped.length > 0 && skipped.length === files.length) setError(`Not mesh files: ${skipped.join(', ')}.`);
      onFiles(files);
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
    }
  };
  return (
    <View testID={testID} style={styles.zone}>
      <View style={styles.text}>
        <Text variant="bodyStrong">Upload STL, OBJ or 3MF files</Text>
        {hint ? (
          <Text variant="caption" color="inkMuted">
            {hint}
          </Text>
        ) : null}
        {error ? (
          <Text variant="caption" color="danger">
            {error}
          </Text>
        ) : null}
      </View>
      <Button label="Choose files" disabled={disabled} testID={`${testID}-choose`} onPress={choose} />
    </View>
  );
}

const styles = StyleSheet.create({
  zone: {
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.lg,
    backgroundColor: colors.surface,
    padding: spacing.lg,
    gap: spacing.md,
  },
  text: { gap: spacing.xs },
});
