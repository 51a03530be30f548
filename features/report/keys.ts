/** The report's cache key (the API path), apart from its hooks so the board can revalidate it without a cycle. */
export const reportKeys = {
  report: (s: number | string, b: number | string) => `/studies/${s}/batches/${b}/report`,
};
