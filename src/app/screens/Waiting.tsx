/** Stands in for a figure whose result the worker is still computing. */
export function Waiting({ what }: { what: string }) {
  return <div className="waiting">Computing {what} …</div>;
}
