// When a build's sources last changed: the newest modification time under each path.
import fs from 'node:fs';
import path from 'node:path';

/** Newest mtime (ms) of `p` and, for a directory, everything under it; 0 when it is missing. */
export function newest(p) {
  let st;
  try {
    st = fs.statSync(p);
  } catch {
    return 0;
  }
  if (!st.isDirectory()) return st.mtimeMs;
  let m = 0;
  for (const e of fs.readdirSync(p)) m = Math.max(m, newest(path.join(p, e)));
  return m;
}
