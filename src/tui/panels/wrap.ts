/** Word wrapping for the panels. */

/** Word-wrap text to `width` columns; a word longer than the width is broken across lines. */
export function wrap(text: string, width: number): string[] {
  const room = Math.max(1, width);
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (word === '') continue;
    if (line === '') line = word;
    else if (line.length + 1 + word.length <= room) line += ' ' + word;
    else {
      out.push(line);
      line = word;
    }
    while (line.length > room) {
      out.push(line.slice(0, room));
      line = line.slice(room);
    }
  }
  if (line !== '') out.push(line);
  return out;
}
