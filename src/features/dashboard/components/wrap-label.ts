/**
 * A chart label broken into lines of at most `maxChars` at spaces (a word
 * longer than that keeps its own line), for axis labels that must not run
 * off a narrow screen.
 */
export function wrapLabel(text: string, maxChars: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/).filter(Boolean)) {
    if (line && line.length + 1 + word.length > maxChars) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines;
}
