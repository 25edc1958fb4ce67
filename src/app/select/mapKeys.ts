/**
 * Keyboard cursor over the evidence map (pure, no DOM). Cells are indexed row-major over
 * (length, variance), index = i·nv + j, as in EvidenceMap.logEvidence and the slice's
 * applyMapCell. The map is drawn with length along x and variance along y (upwards), so
 * ←/→ step the length and ↑/↓ the variance; Home/End go to the smallest/largest length,
 * PageUp/PageDown to the largest/smallest variance. Unknown keys give null.
 */
export function moveMapCursor(index: number, key: string, lengths: number, variances: number): number | null {
  if (lengths < 1 || variances < 1) return null;
  const i = Math.min(lengths - 1, Math.max(0, Math.floor(index / variances)));
  const j = Math.min(variances - 1, Math.max(0, index % variances));
  const at = (a: number, b: number) => Math.min(lengths - 1, Math.max(0, a)) * variances + Math.min(variances - 1, Math.max(0, b));
  switch (key) {
    case 'ArrowLeft':
      return at(i - 1, j);
    case 'ArrowRight':
      return at(i + 1, j);
    case 'ArrowUp':
      return at(i, j + 1);
    case 'ArrowDown':
      return at(i, j - 1);
    case 'Home':
      return at(0, j);
    case 'End':
      return at(lengths - 1, j);
    case 'PageUp':
      return at(i, variances - 1);
    case 'PageDown':
      return at(i, 0);
    default:
      return null;
  }
}
