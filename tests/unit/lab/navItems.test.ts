import { navItems, phoneTabs, PHONE_TABS, visibleNavItems } from '../../../components/lab/navItems';
import type { Role } from '../../../shared/schemas/auth';

const itemsFor = (...roles: Role[]) => visibleNavItems((role) => roles.includes(role));
const keys = (items: { key: string }[]) => items.map((i) => i.key);

describe('the phone tab bar', () => {
  test('a member with every role gets four tabs and "More" with the rest, none lost, none twice', () => {
    const all = itemsFor('designer', 'planner', 'lead', 'operator');
    expect(all).toHaveLength(navItems.length);
    const { tabs, more } = phoneTabs(all);
    expect(tabs).toHaveLength(PHONE_TABS - 1);
    expect(keys(tabs)).toEqual(['home', 'review', 'queue', 'floor']);
    expect(new Set([...keys(tabs), ...keys(more)])).toEqual(new Set(keys(all)));
    expect(tabs.length + more.length).toBe(all.length);
  });

  test('tabs keep the rail order, so a phone and a wide screen list the sections alike', () => {
    const all = itemsFor('planner');
    const { tabs, more } = phoneTabs(all);
    expect(keys(tabs)).toEqual(['home', 'requests', 'plans', 'queue']);
    expect(keys(more)).toEqual(['parts', 'powder', 'settings']);
  });

  test('an operator and a designer have few enough sections for a tab each, with no "More"', () => {
    expect(phoneTabs(itemsFor('operator'))).toEqual({ tabs: itemsFor('operator'), more: [] });
    expect(keys(phoneTabs(itemsFor('operator')).tabs)).toEqual(['home', 'queue', 'floor', 'powder', 'settings']);
    expect(phoneTabs(itemsFor('designer')).more).toEqual([]);
  });
});
