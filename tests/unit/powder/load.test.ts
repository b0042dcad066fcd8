import { checkLoad, DEFAULT_POLICY, type LoadStock } from '@/shared/powder';

// A shelf worked by hand: lot L-1 (oldest, 3.5 kg), L-2 (expired), L-3 (40 kg); 10 kg reused powder of age 2.
const stock: LoadStock = {
  tracked: true,
  materialName: 'Nylon test powder',
  lots: [
    { id: 'new', code: 'L-3', receivedOn: '2026-11-20', expiresOn: null, onHandKg: 40 },
    { id: 'old', code: 'L-1', receivedOn: '2026-09-01', expiresOn: null, onHandKg: 3.5 },
    { id: 'mid', code: 'L-2', receivedOn: '2026-10-15', expiresOn: '2026-11-01', onHandKg: 20 },
  ],
  reusedKg: 10,
  reusedMeanAgeBuilds: 2,
  policy: DEFAULT_POLICY,
  lastCheck: null,
};
const TODAY = '2026-12-02';

describe('the load checked on the floor card before a start', () => {
  it('proposes the oldest usable lots for the fresh powder entered and finds nothing to refuse', () => {
    const c = checkLoad(stock, 12, 8, null, TODAY);
    // 3.5 kg from L-1, the expired L-2 passed over, 12 - 3.5 = 8.5 kg from L-3.
    expect(c.draws).toEqual([
      { lotId: 'old', code: 'L-1', kg: 3.5 },
      { lotId: 'new', code: 'L-3', kg: 8.5 },
    ]);
    expect(c.problems).toEqual([]);
    // Fill 12 fresh + 8 reused at age 2: mean age 8 * 2 / 20 = 0.8 builds, refresh 60 %: within the default rules.
    expect(c.warnings).toEqual([]);
  });

  it('names the material and the shortfall as the server will, for fresh and for reused powder', () => {
    const c = checkLoad(stock, 50, 12, null, TODAY);
    // Usable fresh: 3.5 + 40 = 43.5 kg, so 6.5 kg short; reused 12 - 10 = 2 kg short.
    expect(c.freshShortKg).toBe(6.5);
    expect(c.reusedShortKg).toBe(2);
    expect(c.problems).toEqual([
      'Not enough fresh Nylon test powder: this build loads 50.0 kg and the usable lots hold 43.5 kg (expired lots left out: L-2): 6.5 kg short.',
      'Not enough reused Nylon test powder: this build loads 12.0 kg and the reused stock holds 10.0 kg: 2.0 kg short.',
    ]);
  });

  it('takes the operator\'s corrected lots, and says when they do not add up or a lot holds less', () => {
    expect(checkLoad(stock, 12, 0, [{ lotId: 'new', kg: 12 }], TODAY)).toMatchObject({ draws: [{ lotId: 'new', code: 'L-3', kg: 12 }], problems: [] });
    const wrong = checkLoad(stock, 12, 0, [{ lotId: 'old', kg: 5 }, { lotId: 'new', kg: 6 }], TODAY);
    expect(wrong.problems).toEqual([
      'Lot L-1 of Nylon test powder holds 3.5 kg, not 5.0 kg: 1.5 kg short.',
      'The lots add up to 11.0 kg, but 12.0 kg of fresh powder is loaded: they must match.',
    ]);
  });

  it('warns of an old, thin fill and refuses reuse after a failed melt-flow check', () => {
    // 2 fresh + 8 reused at age 4.5: fill age 8 * 4.5 / 10 = 3.6 builds > 3; refresh 20 % < 30 %.
    const old = { ...stock, reusedMeanAgeBuilds: 4.5, lastCheck: { mvrCm3Per10Min: 12, passed: false, released: false } };
    const c = checkLoad(old, 2, 8, null, TODAY);
    expect(c.warnings.map((w) => w.code)).toEqual(['age', 'refresh']);
    expect(c.problems).toEqual([expect.stringMatching(/^The reused Nylon test powder failed its last melt-flow check/)]);
    expect(checkLoad(old, 10, 0, null, TODAY).problems).toEqual([]);
  });

  it('checks nothing for a material whose stock the lab does not keep', () => {
    expect(checkLoad({ ...stock, tracked: false, lots: [], reusedKg: 0 }, 50, 50, null, TODAY)).toEqual({ draws: [], problems: [], freshShortKg: 0, reusedShortKg: 0, warnings: [] });
  });
});
