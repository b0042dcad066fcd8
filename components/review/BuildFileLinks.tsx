import { View } from 'react-native';
import { planFileUrl } from '../queries/runs';
import { spacing } from '../theme';
import { FileLink } from './FileLink';

/** The build sheet for the operator's clipboard and the packed build for the machine's own preparation software. */
export function BuildFileLinks({ labId, planId, testID = 'build-files' }: { labId: string; planId: string; testID?: string }) {
  return (
    <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm }} testID={testID}>
      <FileLink href={planFileUrl(labId, planId, 'sheet.pdf')} label="Build sheet (PDF)" hint="Views, parts, estimates, checklists" testID={`${testID}-sheet`} />
      <FileLink href={planFileUrl(labId, planId, 'build.3mf')} label="Build file (3MF)" hint="Every placed part with its transform" testID={`${testID}-3mf`} />
    </View>
  );
}
