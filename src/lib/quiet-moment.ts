/**
 * The browser's next quiet moment: when it has finished what it was doing (requestIdleCallback),
 * or after `timeoutMs` at the latest on a page that never goes quiet. Where there is no idle
 * callback (tests without a browser), at once.
 */
export function nextQuietMoment(timeoutMs = 1500): Promise<void> {
  if (typeof requestIdleCallback === 'undefined') return Promise.resolve();
  return new Promise((resolve) => requestIdleCallback(() => resolve(), { timeout: timeoutMs }));
}
