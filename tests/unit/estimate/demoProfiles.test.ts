import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { checkedMachineProfileSchema, checkedMaterialProfileSchema, pairSenseProblems } from '@/shared/types/profiles';

// The demo lab is seeded through the same checks a lead's profile goes through: a demo that the server would refuse
// is a broken demo. The values themselves are invented (sources and "memory" marks beside them in the demo file).
describe('the demo lab profiles', () => {
  test.each(demoMachines.map((m) => [m.name, m]))('machine %s passes the checked machine profile', (_name, machine) => {
    expect(checkedMachineProfileSchema.safeParse(machine).error?.issues ?? []).toEqual([]);
  });

  test.each(demoMaterials.map((m) => [m.name, m]))('material %s passes the checked material profile and fits every demo machine', (_name, material) => {
    expect(checkedMaterialProfileSchema.safeParse(material).error?.issues ?? []).toEqual([]);
    for (const machine of demoMachines) {
      expect(pairSenseProblems(machine, material)).toEqual([]);
      expect(machine.layerHeightsMm).toContain(material.defaultLayerHeightMm);
    }
  });
});
