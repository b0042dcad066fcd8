/**
 * Browser tests drive a real Chromium against the exported app on whatever
 * machine runs the suite; on a small, busy one a step can miss its moment
 * (a frame not yet drawn, a card not yet loaded). A failed browser test is run
 * once more, with the first failure printed, so a real defect still fails
 * twice and shows both times while a one-off stall does not fail the suite.
 * Unit and API tests are never retried.
 */
jest.retryTimes(1, { logErrorsBeforeRetry: true });
