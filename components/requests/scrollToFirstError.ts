/**
 * Brings the first error of a form into view. On a phone the native build
 * keeps its forms short enough to show the errors beside the button, so it
 * has nothing to scroll; the web build (scrollToFirstError.web.ts) does.
 */
export function scrollToFirstError(_formTestID: string): void {}
