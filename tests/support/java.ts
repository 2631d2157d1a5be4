/**
 * Access to Debian's Java runtime (default-jre-headless) for tests: java.lang.StrictMath, whose
 * results the Java SE API specification fixes bit for bit to those of fdlibm 5.3 (the
 * "Freely Distributable Math Library"), is the reference for generators/numeric.
 * In CI (CI=true) a missing runtime is a failure, never a skip.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const CANDIDATES = ['/usr/bin/java', 'java'];

/** Path of a java launcher that runs single-file source programs (Java 11 or later), or null. */
export function javaPath(): string | null {
  for (const j of CANDIDATES) {
    const r = spawnSync(j, ['-version'], { encoding: 'utf8' });
    const m = /version "(\d+)/.exec(`${r.stderr}${r.stdout}`);
    if (r.status === 0 && m && Number(m[1]) >= 11) return j;
  }
  return null;
}

/** A java launcher; throws (so the test fails) when there is none. */
export function requireJava(): string {
  const j = javaPath();
  if (!j) throw new Error("java 11 or later not found (install Debian's default-jre-headless)");
  return j;
}

/** Runs the single-file Java program `source` with `input` on stdin; returns its stdout. */
export function runJava(source: string, input: string): string {
  return execFileSync(requireJava(), [source], { input, encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
}

/**
 * As runJava, with the output kept in the system's temporary folder under the SHA-256 of the
 * program's source and the input: the mutation run repeats one test hundreds of times, and each
 * Java start costs seconds. The file holds only the program's own output for exactly that input.
 */
export function runJavaCached(source: string, input: string): string {
  const key = createHash('sha256').update(readFileSync(source)).update('\0').update(input).digest('hex');
  const file = join(tmpdir(), `kiln-java-${key}.txt`);
  if (existsSync(file)) return readFileSync(file, 'utf8');
  const out = runJava(source, input);
  const part = `${file}.${process.pid}.part`;
  writeFileSync(part, out);
  renameSync(part, file);
  return out;
}
