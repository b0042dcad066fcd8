import { Button, Text } from '../ui';
import { Sheet, SheetActions } from './Sheet';

/**
 * Someone saved the plan after this copy was read. Nothing is dropped without
 * the planner choosing it: take theirs (this copy's changes go) or save this
 * copy's changes over theirs.
 */
export function ConflictDialog({ open, currentVersion, onReload, onKeepMine, onClose, busy }: { open: boolean; currentVersion: number | null; onReload: () => void; onKeepMine: () => void; onClose: () => void; busy: boolean }) {
  return (
    <Sheet title="This plan was saved by someone else" open={open} onClose={onClose} testID="conflict-dialog" dismissable={false}>
      <Text>
        Since you opened it, the plan was saved again{currentVersion ? ` (it is now at version ${currentVersion})` : ''}. Your changes are still here and
        still in this browser's draft.
      </Text>
      <Text color="inkMuted">Reload takes their plan and drops your unsaved changes. Keep mine saves your lines, quantities and name over theirs.</Text>
      <SheetActions>
        <Button label="Decide later" variant="ghost" onPress={onClose} testID="conflict-later" />
        <Button label="Reload theirs" variant="secondary" onPress={onReload} testID="conflict-reload" disabled={busy} />
        <Button label="Keep mine" onPress={onKeepMine} loading={busy} testID="conflict-keep-mine" />
      </SheetActions>
    </Sheet>
  );
}
