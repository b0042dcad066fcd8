/**
 * Scrolls the first inline error of the form (an element whose test id ends
 * in "-error", in document order) to the middle of the view and focuses the
 * input before it, so a long form never fails silently below the fold.
 */
export function scrollToFirstError(formTestID: string): void {
  // After React has painted the messages.
  requestAnimationFrame(() => {
    const form = document.querySelector(`[data-testid="${formTestID}"]`);
    const first = form?.querySelector('[data-testid$="-error"]');
    if (!(first instanceof HTMLElement)) return;
    first.scrollIntoView({ block: 'center', behavior: 'smooth' });
    const field = first.parentElement?.querySelector('input, textarea');
    if (field instanceof HTMLElement) field.focus({ preventScroll: true });
  });
}
