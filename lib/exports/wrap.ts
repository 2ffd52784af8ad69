// Text wrapped to a width for the plain-text parts of the exports (the C header's comments, the CSV bundle's
// README): one rule for both.

/** The words of `text` (runs of white space fold to one space) in lines of at most `width` characters; a longer word stands alone on its line. */
export function wrapWords(text: string, width: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else {
      line = line ? `${line} ${word}` : word;
    }
  }
  if (line) lines.push(line);
  return lines;
}
