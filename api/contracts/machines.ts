/** A machine as the register lists it. */
export interface MachineSummary {
  id: string;
  name: string;
  assetTag: string;
  location: string;
  kind: string;
  model: string;
  spec: Record<string, unknown>;
}
