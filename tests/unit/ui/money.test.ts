import { formatMoney } from '../../../components/ui/format';

describe('amounts of money', () => {
  test("are led by the lab's ISO 4217 code, with the currency's own minor units (ISO 4217: EUR 2 decimals, JPY none, BHD 3)", () => {
    expect(formatMoney(1234.5, 'EUR')).toBe('EUR 1,234.50');
    expect(formatMoney(1234.5, 'JPY')).toBe('JPY 1,235');
    expect(formatMoney(1.2345, 'BHD')).toBe('BHD 1.235');
  });

  test('show a dash for no amount, and the bare amount until the currency is known', () => {
    expect(formatMoney(null, 'EUR')).toBe('–');
    expect(formatMoney(Number.NaN, 'EUR')).toBe('–');
    expect(formatMoney(7.4, undefined)).toBe('7.40');
  });
});
