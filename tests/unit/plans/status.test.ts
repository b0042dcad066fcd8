import { allowedNext, canTakeBack, canTransition, isBeforePrinting, PLAN_STATUSES } from '../../../shared/plans/status';

describe('plan statuses', () => {
  test('the happy path runs from draft to done one step at a time', () => {
    const path = ['draft', 'in_review', 'approved', 'queued', 'printing', 'cooling', 'breakout', 'finishing', 'done'] as const;
    for (let i = 0; i + 1 < path.length; i++) expect(canTransition(path[i], path[i + 1])).toBe(true);
  });

  test('a plan sent back returns to draft, not straight to review', () => {
    expect(canTransition('in_review', 'changes_requested')).toBe(true);
    expect(canTransition('changes_requested', 'draft')).toBe(true);
    expect(canTransition('changes_requested', 'in_review')).toBe(false);
  });

  test('a plan can be cancelled in every state before printing and in none after', () => {
    for (const s of PLAN_STATUSES) {
      expect(canTransition(s, 'cancelled')).toBe(isBeforePrinting(s));
    }
    expect(canTransition('printing', 'cancelled')).toBe(false);
  });

  test('no stage can be skipped at the machine', () => {
    expect(canTransition('queued', 'cooling')).toBe(false);
    expect(canTransition('printing', 'breakout')).toBe(false);
    expect(canTransition('breakout', 'done')).toBe(false);
  });

  test('an approval can be taken back (to review or to draft) only from approved or queued, and the machine never offers it', () => {
    for (const s of PLAN_STATUSES) {
      const back = s === 'approved' || s === 'queued';
      expect(canTakeBack(s, 'in_review')).toBe(back);
      expect(canTakeBack(s, 'draft')).toBe(back);
    }
    expect(allowedNext('queued')).toEqual(['printing', 'cancelled']);
    expect(canTransition('queued', 'draft')).toBe(false);
  });

  test('finished states have no way out', () => {
    for (const s of ['done', 'cancelled', 'aborted'] as const) expect(allowedNext(s)).toEqual([]);
  });
});
