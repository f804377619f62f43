import { spawn } from 'node:child_process';
import { ROOT } from './stack';

export interface RunResult {
  code: number;
  output: string;
}

/** Run a command with inherited output (also captured), in the project folder. */
export function runCommand(cmd: string, args: string[], env: Record<string, string> = {}): Promise<RunResult> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: ROOT, env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
    let output = '';
    const take = (chunk: Buffer, to: NodeJS.WriteStream) => {
      const text = chunk.toString();
      output += text;
      to.write(text);
    };
    child.stdout.on('data', (c: Buffer) => take(c, process.stdout));
    child.stderr.on('data', (c: Buffer) => take(c, process.stderr));
    child.on('close', (code) => resolve({ code: code ?? 1, output }));
  });
}
