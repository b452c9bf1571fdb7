// A bulk import's writer thread, seen from the service (issue 8: 2,000 checks per second).
//
// Why a thread: writing a check into SQLite (its rows, indexes, audit entry, and the WAL and its
// checkpoints) costs about as much as validating and computing it, and better-sqlite3 blocks the
// thread it runs on. With the writes on a thread of their own, on their own connection to the same
// file, the main thread prepares check n + 1 while check n is written. The import stays one
// transaction: every check is validated before the writer commits, and any refusal or failure
// rolls all of it back. Only a lab file can have a second connection; an in-memory lab, a small
// import, or a thread that cannot start is written in the service's own transaction as before.
import { Worker } from 'node:worker_threads';
import type { LabDb } from '../../db/store';
import type { CheckWrite } from '../../db/queries/check-write';
import type { FromWriter, ToWriter } from './import-writer-thread';

/** Checks sent to the thread per message: fewer messages, and still a steady flow. */
const CHECKS_PER_MESSAGE = 25;
/** Starting takes about a second (tsx loads the thread's TypeScript); far longer means it never will. */
const WRITER_START_TIMEOUT_MS = 30_000;

export interface ImportWriter {
  /** Starts the import's transaction. */
  begin(): void;
  /** Queues one check; it is written while the caller goes on. */
  write(check: CheckWrite): void;
  /** Commits every check written since begin(); rejects, with nothing written, on a failure. */
  commit(): Promise<number>;
  /** Drops every check written since begin(). */
  rollback(): Promise<void>;
}

class WriterThread implements ImportWriter {
  private pending: CheckWrite[] = [];
  private waiting: { resolve: (m: FromWriter) => void; reject: (e: Error) => void } | undefined;
  dead: Error | undefined;

  constructor(private readonly worker: Worker) {
    worker.on('message', (m: FromWriter) => {
      const w = this.waiting;
      this.waiting = undefined;
      w?.resolve(m);
    });
    worker.on('error', (e) => this.die(e));
    worker.on('exit', (code) => this.die(new Error(`the import's writer thread stopped (exit ${code})`)));
  }

  private die(e: Error): void {
    this.dead ??= e;
    const w = this.waiting;
    this.waiting = undefined;
    w?.reject(this.dead);
  }

  private send(m: ToWriter): void {
    if (this.dead) throw this.dead;
    this.worker.postMessage(m);
  }

  private reply(): Promise<FromWriter> {
    if (this.dead) return Promise.reject(this.dead);
    return new Promise((resolve, reject) => (this.waiting = { resolve, reject }));
  }

  private flush(): void {
    if (this.pending.length === 0) return;
    this.send({ kind: 'checks', checks: this.pending });
    this.pending = [];
  }

  begin(): void {
    this.pending = [];
    // Kept alive while an import waits on it; otherwise the thread never holds the process open.
    this.worker.ref();
    this.send({ kind: 'begin' });
  }

  write(check: CheckWrite): void {
    this.pending.push(check);
    if (this.pending.length >= CHECKS_PER_MESSAGE) this.flush();
  }

  async commit(): Promise<number> {
    try {
      this.flush();
      const answer = this.reply();
      this.send({ kind: 'commit' });
      const m = await answer;
      if (m.kind === 'committed') return m.written;
      if (m.kind === 'failed') throw Object.assign(new Error(m.message), { code: m.code });
      throw new Error(`the import's writer thread answered ${m.kind} to commit`);
    } finally {
      this.worker.unref();
    }
  }

  async rollback(): Promise<void> {
    try {
      this.pending = [];
      const answer = this.reply();
      this.send({ kind: 'rollback' });
      await answer;
    } finally {
      this.worker.unref();
    }
  }

  /** Closes the thread's connection and ends the thread (at once if it does not end itself). */
  async close(): Promise<void> {
    if (this.dead) return;
    const ended = new Promise<void>((resolve) => this.worker.once('exit', () => resolve()));
    // Held open until the thread has closed its connection (and checkpointed the file).
    this.worker.ref();
    this.worker.postMessage({ kind: 'close' } satisfies ToWriter);
    const timer = setTimeout(() => void this.worker.terminate(), 5000);
    await ended;
    clearTimeout(timer);
  }
}

const THREADS = new WeakMap<LabDb, Promise<WriterThread | undefined>>();

/** The writer thread of this lab file, started on first use and kept for later imports; undefined
 * for a lab with no file of its own, or when the thread cannot start (the import is then written
 * in the service's own transaction). */
export function importWriterFor(db: LabDb): Promise<ImportWriter | undefined> {
  const file = db.memory || db.readonly ? '' : db.name;
  if (!file) return Promise.resolve(undefined);
  let started = THREADS.get(db);
  if (started) {
    return started.then((t) => {
      if (!t?.dead) return t;
      THREADS.delete(db);
      return importWriterFor(db);
    });
  }
  started = new Promise<WriterThread | undefined>((resolve) => {
    let worker: Worker;
    try {
      // Beside this module: the compiled thread in dist/, or the sources' entry, which registers
      // its own loader (see import-writer-thread.mjs). No loader flags inherited.
      worker = new Worker(new URL('./import-writer-thread.mjs', import.meta.url), {
        workerData: { file },
        execArgv: [],
      });
    } catch {
      resolve(undefined);
      return;
    }
    const failed = () => {
      clearTimeout(timer);
      void worker.terminate();
      resolve(undefined);
    };
    // A thread that neither starts nor fails (a host that cannot load its code) must not hold
    // the import up for ever: it is written in the service's own transaction instead.
    const timer = setTimeout(failed, WRITER_START_TIMEOUT_MS);
    worker.once('error', failed);
    worker.once('exit', failed);
    worker.once('message', (m: FromWriter) => {
      clearTimeout(timer);
      worker.off('error', failed);
      worker.off('exit', failed);
      if (m.kind !== 'ready') return failed();
      worker.unref();
      resolve(new WriterThread(worker));
    });
  });
  THREADS.set(db, started);
  return started;
}

/** Stops the lab file's writer thread, if it has one (before the file is closed). */
export async function closeImportWriter(db: LabDb): Promise<void> {
  const started = THREADS.get(db);
  THREADS.delete(db);
  await (await started)?.close();
}
