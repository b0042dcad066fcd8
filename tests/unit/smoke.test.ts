import { strToU8 } from 'fflate';
test('babel transform works', () => { const x: number = 2; expect(strToU8('ab').length + x).toBe(4); });
