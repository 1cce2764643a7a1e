/** Where a command writes: the process's streams in bin/mvledger.js, buffers in tests. */
export interface CliIO {
  stdout(text: string): void;
  stderr(text: string): void;
}
