/** What every worker request carries (./protocol.ts, ./tuningProtocol.ts); imports nothing. */
export interface RequestBase {
  readonly id: number;
}
