/**
 * Breaks a chart label into lines of at most `maxChars` characters at spaces (a word longer than a
 * line is cut into pieces), so a long label wraps instead of losing its end. With `maxLines`, the
 * last line kept ends in "…" when text is left over; the full label then belongs in a tooltip.
 */
export function wrapLabel(text: string, maxChars: number, maxLines = Infinity): string[] {
  const width = Math.max(1, Math.floor(maxChars));
  const lines: string[] = [];
  let line = "";
  for (const word of text.trim().split(/\s+/).filter(Boolean)) {
    let rest = word;
    while (rest.length > width) {
      if (line) lines.push(line);
      lines.push(rest.slice(0, width));
      rest = rest.slice(width);
      line = "";
    }
    if (!line) line = rest;
    else if (line.length + 1 + rest.length <= width) line = `${line} ${rest}`;
    else {
      lines.push(line);
      line = rest;
    }
  }
  if (line) lines.push(line);
  if (lines.length <= maxLines) return lines;
  const kept = lines.slice(0, maxLines);
  const last = kept[kept.length - 1];
  kept[kept.length - 1] = `${(last.length >= width ? last.slice(0, width - 1) : last).trimEnd()}…`;
  return kept;
}
