/** A pino destination that keeps every JSON line, for asserting on the security log. */
export function captureLog() {
  const lines: Array<Record<string, unknown>> = [];
  return {
    lines,
    stream: {
      write(line: string) {
        lines.push(JSON.parse(line) as Record<string, unknown>);
      },
    },
    /** The entries of one security event, oldest first. */
    security(event: string) {
      return lines.filter((l) => l.security === event);
    },
  };
}
