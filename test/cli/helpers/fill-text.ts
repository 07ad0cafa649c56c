/** A large text of `bytes` bytes whose every line names `label`: old and new contents told apart at any offset. */
export function fillText(label: string, bytes: number): string {
  const line = `${label} ${'x'.repeat(Math.max(0, 63 - label.length))}\n`;
  const n = Math.ceil(bytes / line.length);
  return line.repeat(n);
}
