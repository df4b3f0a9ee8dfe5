/**
 * Turns colour on for chalk (which ink styles text with) before ink is loaded, so a test can see which
 * escape sequences a frame would carry on a colour terminal; under a test runner chalk would otherwise
 * detect no colour support and print no escape sequence at all, whatever the App asks for. Import this
 * module first, then call {@link restoreColorEnv} once the imports are done (chalk reads the variable
 * only when it loads), so processes the tests spawn are not affected.
 */
const previous = process.env.FORCE_COLOR;
process.env.FORCE_COLOR = '3';

/** Puts FORCE_COLOR back as it was before this module loaded. */
export function restoreColorEnv(): void {
  if (previous === undefined) delete process.env.FORCE_COLOR;
  else process.env.FORCE_COLOR = previous;
}
