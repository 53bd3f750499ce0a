/**
 * A file's size the one way Rholog says it, in binary units as file managers
 * show them: "812 bytes", "640 kB", "4.5 MB" (4.5 × 1024 × 1024 bytes).
 */
export function formatFileSize(bytes: number): string {
  if (bytes < 1024) return `${bytes} byte${bytes === 1 ? '' : 's'}`;
  const kB = Math.round(bytes / 1024);
  if (kB < 1024) return `${kB} kB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}
