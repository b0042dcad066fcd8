import { allowedNext, STATUS_LABELS, type PlanStatus } from '../plans/status';
import { CAUTION_DEFERRAL, stageCautions, type Caution } from './cautions';
import { stageChecklist, type ChecklistContext, type ChecklistItem } from './checklist';

export interface StageCard {
  status: PlanStatus;
  title: string;
  /** One line saying what the operator does now. */
  instruction: string;
  checklist: ChecklistItem[];
  cautions: Caution[];
  deferral: string;
  /** Where the big button(s) can take the run from here. */
  next: PlanStatus[];
}

const INSTRUCTIONS: Partial<Record<PlanStatus, string>> = {
  queued: 'Work the checks, load the powder, then start the build.',
  printing: 'The build is printing. Record the end when the last layer is done, or abort with a reason.',
  cooling: 'Let the cake cool: in the machine to the removal temperature, then outside to the handling temperature. Enter readings if you take them.',
  breakout: 'Break the parts out of the cake and count the good and failed parts of each line.',
  finishing: 'Remove the last powder, blast and inspect the parts, then mark the build done.',
  done: 'This build is done.',
  aborted: 'This build was aborted; its parts are open in their requests again.',
};

/** The machine floor's card for a run's stage: what to do, what to confirm, what to watch out for. */
export function stageCard(status: PlanStatus, context: ChecklistContext = {}): StageCard {
  return {
    status,
    title: STATUS_LABELS[status],
    instruction: INSTRUCTIONS[status] ?? '',
    checklist: stageChecklist(status, context),
    cautions: stageCautions(status),
    deferral: CAUTION_DEFERRAL,
    next: allowedNext(status).filter((s) => s !== 'cancelled'),
  };
}
