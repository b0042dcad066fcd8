import { actionForKey } from '../../../components/plans/shortcuts';

describe('undo by keyboard in the plan editor', () => {
  test('Ctrl Z and Cmd Z take back the last change by hand', () => {
    expect(actionForKey({ key: 'z', ctrlKey: true }, false)).toBe('undo');
    expect(actionForKey({ key: 'Z', metaKey: true }, false)).toBe('undo');
  });
  test('in a text field Ctrl Z is the field\'s own undo, and a plain Z, Shift or Alt is no undo', () => {
    expect(actionForKey({ key: 'z', ctrlKey: true }, true)).toBeNull();
    expect(actionForKey({ key: 'z' }, false)).toBeNull();
    expect(actionForKey({ key: 'Z', ctrlKey: true, shiftKey: true }, false)).toBeNull();
    expect(actionForKey({ key: 'z', ctrlKey: true, altKey: true }, false)).toBeNull();
  });
});
