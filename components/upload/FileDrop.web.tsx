/**
 * The web's way in for mesh files: a drop zone that takes one or many files
 * dragged from the desktop, and a button that opens the browser's file chooser
 * (a hidden <input type="file" multiple>).
 */
import { useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '../theme';
import { Button, Text } from '../ui';
import type { FileDropProps, PickedFile } from './types';

function picked(list: FileList | null | undefined): PickedFile[] {
  return Array.from(list ?? []).map((f) => ({ name: f.name, sizeBytes: f.size, body: f }));
}

export function FileDrop({ onFiles, disabled, accept, testID = 'file-drop', hint }: FileDropProps) {
  const zone = useRef<View>(null);
  const input = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const latest = useRef({ onFiles, disabled });
  latest.current = { onFiles, disabled };

  useEffect(() => {
    // React Native Web's View drops DOM drag props, so the listeners go on its element directly.
    const el = zone.current as unknown as HTMLElement | null;
    if (!el) return;
    let depth = 0;
    const hasFiles = (e: DragEvent) => Array.from(e.dataTransfer?.types ?? []).includes('Files');
    const enter = (e: DragEvent) => {
      if (!hasFiles(e) || latest.current.disabled) return;
      e.preventDefault();
      depth += 1;
      setOver(true);
    };
    const overZone = (e: DragEvent) => {
      if (!hasFiles(e) || latest.current.disabled) return;
      // Without preventDefault the browser would open the file instead of dropping it here.
      e.preventDefault();
      if (e.dataTransfer) e.dataTransfer.dropEffect = 'copy';
    };
    const leave = () => {
      depth = Math.max(0, depth - 1);
      if (depth === 0) setOver(false);
    };
    const drop = (e: DragEvent) => {
      e.preventDefault();
      depth = 0;
      setOver(false);
      if (latest.current.disabled) return;
      const files = picked(e.dataTransfer?.files);
      if (files.length > 0) latest.current.onFiles(files);
    };
    el.addEventListener('dragenter', enter);
    el.addEventListener('dragover', overZone);
    el.addEventListener('dragleave', leave);
    el.addEventListener('drop', drop);
    return () => {
      el.removeEventListener('dragenter', enter);
      el.removeEventListener('dragover', overZone);
      el.removeEventListener('dragleave', leave);
      el.removeEventListener('drop', drop);
    };
  }, []);

  return (
    <View ref={zone} testID={testID} style={[styles.zone, over && styles.over, disabled && styles.disabled]} accessibilityLabel="Drop zone for mesh files">
      <View style={styles.text}>
        <Text variant="bodyStrong">{over ? 'Drop to upload' : 'Drop STL, OBJ or 3MF files here'}</Text>
        {hint ? (
          <Text variant="caption" color="inkMuted">
            {hint}
          </Text>
        ) : null}
      </View>
      <Button label="Choose files" variant="secondary" size="sm" disabled={disabled} testID={`${testID}-choose`} onPress={() => input.current?.click()} />
      <input
        ref={input}
        type="file"
        multiple
        accept={accept.join(',')}
        data-testid={`${testID}-input`}
        style={{ display: 'none' }}
        onChange={(e) => {
          const files = picked(e.currentTarget.files);
          // Clear it, so choosing the same file again still fires a change.
          e.currentTarget.value = '';
          if (files.length > 0) onFiles(files);
        }}
      />
    </View>
  );
}

const styles = StyleSheet.create({
  zone: {
    borderWidth: 2,
    borderStyle: 'dashed',
    borderColor: colors.lineStrong,
    borderRadius: radius.lg,
    backgroundColor: colors.surface,
    padding: spacing.xl,
    gap: spacing.md,
    alignItems: 'flex-start',
    minHeight: 120,
    justifyContent: 'center',
  },
  over: { borderColor: colors.ember, backgroundColor: colors.emberSoft },
  disabled: { opacity: 0.55 },
  text: { gap: spacing.xs },
});
