/**
 * Work to do however the process ends: normally (the 'exit' event) or by
 * SIGINT, SIGTERM or SIGHUP (src/output/temporaries.ts runs it before the
 * signal's default action). Tasks are synchronous and best effort; each
 * runs once.
 */
const tasks = new Set<() => void>();
let listening = false;

/** Adds a task; returns a function that removes it (when its work is done early). */
export function atProcessEnd(task: () => void): () => void {
  if (!listening) {
    listening = true;
    process.once('exit', runProcessEndTasks);
  }
  tasks.add(task);
  return () => tasks.delete(task);
}

export function runProcessEndTasks(): void {
  for (const task of tasks) {
    tasks.delete(task);
    try {
      task();
    } catch {
      // best effort
    }
  }
}
