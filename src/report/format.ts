/** Number formatting shared by the text reports. */

/** Decimal places that show `scale` (e.g. a half-width) to two significant digits. */
export function decimalsFor(scale: number): number {
  if (!(scale > 0) || !Number.isFinite(scale)) return 4;
  return Math.max(0, Math.min(10, 1 - Math.floor(Math.log10(scale))));
}

export function fixed(x: number, decimals: number): string {
  if (!Number.isFinite(x)) return String(x);
  const text = x.toFixed(decimals);
  return text.startsWith('-') && Number(text) === 0 ? text.slice(1) : text.replace(/^-/, '−');
}

/** A value to about four significant digits, without exponent for ordinary magnitudes. */
export function sig(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const magnitude = Math.abs(x);
  if (magnitude >= 1e-3 && magnitude < 1e9) {
    const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
    return fixed(x, decimals);
  }
  return x.toExponential(digits - 1).replace(/^-/, '−');
}

export function count(n: number): string {
  return Math.round(n).toLocaleString('en-US');
}

export function duration(seconds: number | null): string {
  if (seconds === null || !Number.isFinite(seconds)) return '?';
  if (seconds < 1) return `${Math.max(0, seconds).toFixed(seconds < 0.1 ? 2 : 1)} s`;
  if (seconds < 120) return `${seconds.toFixed(seconds < 10 ? 1 : 0)} s`;
  if (seconds < 7200) return `${(seconds / 60).toFixed(1)} min`;
  if (seconds < 172800) return `${(seconds / 3600).toFixed(1)} h`;
  return `${(seconds / 86400).toFixed(1)} days`;
}

/** "0.4 s sampling + 0.1 s analysis": where a run's time went. */
export function timeSplit(samplingSeconds: number, analysisSeconds: number): string {
  return `${duration(samplingSeconds)} sampling + ${duration(analysisSeconds)} analysis`;
}

export function rate(perSecond: number): string {
  if (!Number.isFinite(perSecond)) return '?';
  if (perSecond >= 1e6) return `${(perSecond / 1e6).toFixed(2)} M`;
  if (perSecond >= 1e3) return `${(perSecond / 1e3).toFixed(1)} k`;
  return perSecond.toFixed(0);
}

/** Lays rows out as left-aligned columns separated by two spaces. */
export function columns(rows: string[][], indent = '  '): string[] {
  const widths: number[] = [];
  for (const row of rows) row.forEach((cell, i) => (widths[i] = Math.max(widths[i] ?? 0, cell.length)));
  return rows.map((row) => indent + row.map((cell, i) => (i === row.length - 1 ? cell : cell.padEnd(widths[i]))).join('  '));
}

/**
 * A mean and its interval as a reader should see them: `mean ± h` only when the interval is
 * centred on the mean, else `mean (low … high)`, so that no ± range suggests values the
 * interval excludes.
 */
export function meanWithInterval(mean: number, low: number, high: number, decimals: number): string {
  const halfWidth = (high - low) / 2;
  const centre = (low + high) / 2;
  const centred = Math.abs(centre - mean) <= 1e-9 * Math.max(1, Math.abs(mean)) + 1e-3 * halfWidth;
  return centred ? `${fixed(mean, decimals)} ± ${fixed(halfWidth, decimals)}` : `${fixed(mean, decimals)} (${fixed(low, decimals)} … ${fixed(high, decimals)})`;
}
