/** One item of the library search API (GET /api/v1/steps) as the step pickers read it. */
export interface LibrarySearchHit {
  id: number;
  versionId: number;
  version: number;
  label: string;
  reaction: string;
  status: string;
  /** the rate constant at the search temperature, in kUnit; null when it cannot be computed */
  k: number | null;
  kUnit: string;
}
