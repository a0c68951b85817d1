/** An in-memory CliIo for the fit command's tests: captures output, serves given files from memory. */
import { readFileSync } from 'node:fs';
import type { CliIo } from '../../../server/engine/cli/fit';

export type MemoryIo = CliIo & { out: string; err: string; written: Record<string, string> };

export function memoryIo(files: Record<string, string> = {}): MemoryIo {
  const io = {
    out: '',
    err: '',
    written: {} as Record<string, string>,
    progress: false,
    stdout: (t: string) => void (io.out += t),
    stderr: (t: string) => void (io.err += t),
    readFile: (f: string) => (f in files ? new TextEncoder().encode(files[f]) : readFileSync(f)),
    writeFile: (f: string, t: string) => void (io.written[f] = t),
  };
  return io;
}
