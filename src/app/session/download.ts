/** Save bytes as a file through a temporary blob: link (no network; allowed by the page's CSP). */
import type { ExportFile, ExportParts } from './exports.ts';

export function download(file: ExportFile | ExportParts): void {
  // A parted export becomes one Blob of its parts (no copy into one buffer; see ExportParts).
  const parts = ('parts' in file ? [...file.parts] : [file.bytes]) as BlobPart[];
  const url = URL.createObjectURL(new Blob(parts, { type: file.mime }));
  const a = document.createElement('a');
  a.href = url;
  a.download = file.name;
  a.rel = 'noopener';
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
