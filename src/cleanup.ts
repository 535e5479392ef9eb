/**
 * Work to do however the process ends: normally (the 'exit' event), or by
 * SIGINT, SIGTERM or SIGHUP while asynchronous work that leaves something
 * behind is under way (an atomic write's temporary file, an engine query
 * that may spill to its folder).
 *
 * Signal listeners are held only during such work. A listener in Node runs
 * on the event loop, so while one is installed a signal cannot stop a long
 * synchronous computation; without one the signal's default action ends the
 * process at once, which is what Ctrl-C must do during the analysis.
 */
const tasks = new Set<() => void>();
let listeningForExit = false;

/** Adds a task run once when the process ends (or by a signal during guarded work); returns a function that removes it. */
export function atProcessEnd(task: () => void): () => void {
  if (!listeningForExit) {
    listeningForExit = true;
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

export const CLEANUP_SIGNALS = ['SIGINT', 'SIGTERM', 'SIGHUP'] as const;

let holders = 0;
const listeners = new Map<NodeJS.Signals, () => void>();

/** Runs the end-of-process tasks, then ends the process by the same signal (its default action, the listeners being gone). */
function onSignal(signal: NodeJS.Signals): void {
  runProcessEndTasks();
  for (const [s, listener] of listeners) process.removeListener(s, listener);
  listeners.clear();
  process.kill(process.pid, signal);
}

/** Holds the signal listeners while `work` runs (see the top of this file). */
export async function withSignalCleanup<T>(work: () => Promise<T>): Promise<T> {
  if (holders++ === 0) {
    for (const signal of CLEANUP_SIGNALS) {
      const listener = () => onSignal(signal);
      listeners.set(signal, listener);
      process.on(signal, listener);
    }
  }
  try {
    return await work();
  } finally {
    if (--holders === 0) {
      for (const [s, listener] of listeners) process.removeListener(s, listener);
      listeners.clear();
    }
  }
}
