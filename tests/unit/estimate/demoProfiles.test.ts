import { demoMachines, demoMaterials } from '@/shared/demo/profiles';
import { machineProfileSchema, materialProfileSchema } from '@/shared/types/profiles';

describe('the demo lab profiles', () => {
  test.each(demoMachines.map((m) => [m.name, m]))('machine %s passes the machine profile schema', (_name, machine) => {
    expect(machineProfileSchema.safeParse(machine).success).toBe(true);
  });

  test.each(demoMaterials.map((m) => [m.name, m]))('material %s passes the material profile schema', (_name, material) => {
    expect(materialProfileSchema.safeParse(material).success).toBe(true);
  });

  test('one machine swaps chambers and one does not, and both print every material\'s default layer height', () => {
    expect(demoMachines.map((m) => m.chamberCount).sort()).toEqual([1, 2]);
    for (const m of demoMachines) {
      for (const mat of demoMaterials) expect(m.layerHeightsMm).toContain(mat.defaultLayerHeightMm);
    }
  });

  test('the powders use the studied 30 % fresh refresh ratio (Polymers 2025, 17(5):577) and a nylon 12 bed near 174 C (Gibson, Rosen & Stucker 2015 pp. 124, 132)', () => {
    for (const mat of demoMaterials) expect(mat.refreshRatio).toBe(0.3);
    expect(demoMaterials[0].bedTempC).toBe(174);
  });

  test('unfilled nylon powders have bulk densities within 0.43-0.50 g/cm^3 (memory)', () => {
    for (const mat of demoMaterials.slice(0, 2)) {
      expect(mat.bulkDensityGPerCm3).toBeGreaterThanOrEqual(0.43);
      expect(mat.bulkDensityGPerCm3).toBeLessThanOrEqual(0.5);
    }
  });

  test('a recoat takes 6-15 s a layer (memory)', () => {
    for (const m of demoMachines) {
      expect(m.recoatSeconds).toBeGreaterThanOrEqual(6);
      expect(m.recoatSeconds).toBeLessThanOrEqual(15);
    }
  });
});
