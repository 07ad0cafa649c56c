/**
 * The text of a prompt from what the text field collected. Keys that arrive in one read (typed
 * fast, pasted, sent over SSH or by tmux) reach the field as one string: Backspace (DEL or BS)
 * then lands as a character instead of deleting, and Enter as a line break instead of accepting.
 * Here they act as the keys they are.
 */

/** The field's text with Backspaces applied and control characters dropped; `enter` when a line break ended it. */
export interface TypedText {
  text: string;
  enter: boolean;
}

/**
 * @param raw what the field holds (its old text with the chunk inserted at the cursor)
 * @returns the text up to the first line break, each Backspace removing the character before it
 */
export function typedText(raw: string): TypedText {
  let text = '';
  for (const ch of raw) {
    if (ch === '\r' || ch === '\n') return { text, enter: true };
    if (ch === '\u007f' || ch === '\b') {
      text = Array.from(text).slice(0, -1).join('');
      continue;
    }
    // Other control characters (an escape sequence's ESC, a tab) are not part of a value.
    if (ch < ' ') continue;
    text += ch;
  }
  return { text, enter: false };
}
