import { z } from 'zod';
import { machineFieldGroups } from '../../../components/settings/profileFields';
import { profileErrors, profileFrom, valuesFrom } from '../../../components/settings/profileForm';

const preheat = machineFieldGroups.flatMap((g) => g.fields).find((f) => f.key === 'preheatSeconds')!;

describe('a machine form shows and takes a figure in the unit the list shows', () => {
  test('preheat is read and typed in minutes and stored in seconds', () => {
    expect(preheat.unit).toBe('min');
    expect(valuesFrom(machineFieldGroups, { preheatSeconds: 5400 }).preheatSeconds).toBe('90');
    expect(profileFrom(machineFieldGroups, { ...valuesFrom(machineFieldGroups, {}), preheatSeconds: '45' }).preheatSeconds).toBe(2700);
    // What is shown is what goes back: an unchanged form changes nothing.
    expect(profileFrom(machineFieldGroups, valuesFrom(machineFieldGroups, { preheatSeconds: 1234 })).preheatSeconds).toBe(1234);
  });

  test('a bound broken in the stored unit is named in the shown one', () => {
    const schema = z.object({ preheatSeconds: z.number().max(7200) });
    const input = profileFrom([{ title: 't', fields: [preheat] }], { preheatSeconds: '150' });
    const parsed = schema.safeParse(input);
    expect(parsed.success).toBe(false);
    expect(profileErrors([{ title: 't', fields: [preheat] }], parsed.error!, input).preheatSeconds).toBe('At most 120.');
  });

  test('text that is not a number stays text, so the check names it', () => {
    expect(profileFrom([{ title: 't', fields: [preheat] }], { preheatSeconds: 'soon' }).preheatSeconds).toBe('soon');
  });
});
