/**
 * Sharded builds: `kiln plan`, `kiln build --shard K/N`, `kiln gather`. The demo content split
 * into 3 shards and gathered gives byte for byte the tree a one-machine build writes (node:crypto
 * SHA-256 of every file); a missing shard, a tampered job output, a duplicated shard and a stale
 * shard (content changed after planning) are refused with one line naming the job and the shard,
 * and nothing is written; bad --shard values are usage errors (exit 2, a usage line).
 */
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync, cpSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { expectOneLine, kiln, treeDigest, workspace } from './helpers.ts';

const RELEASE = 'releases/2.0.0/release.yaml';
const HEX64 = /^[0-9a-f]{64}$/;

describe('sharded build: plan, shards, gather', () => {
  const ws = workspace({ cache: 'cold' });
  afterAll(() => ws.dispose());
  const at = (name: string) => join(ws.dir, name);
  const planFile = at('plan.json');
  const shards = [1, 2, 3].map((k) => at(`shard-${k}`));
  const gather = (out: string, dirs: string[], ...extra: string[]) => kiln('gather', ...dirs, '--content', ws.content, '--out', at(out), ...extra);

  it('kiln plan lists every job built from inputs (not the archived releases) with its fingerprint', () => {
    const r = kiln('plan', '--content', ws.content, '--out', planFile);
    expect(r.status, r.stderr).toBe(0);
    const plan = JSON.parse(readFileSync(planFile, 'utf8')) as { schema: string; planSha256: string; jobs: { id: string; fingerprint: string }[] };
    expect(plan.schema).toBe('kiln/plan/1');
    expect(plan.planSha256).toMatch(HEX64);
    // The demo: 1.0.0 and 1.1.0 are published (served from content/archive), 2.0.0 has two detectors.
    expect(plan.jobs.map((j) => j.id).sort()).toEqual(['quillon-tarncam~2.0.0/bi1', 'quillon-tarncam~2.0.0/fi0', 'quillon-tarncam~2.1.0/bi1', 'quillon-tarncam~2.1.0/fi0']);
    for (const j of plan.jobs) expect(j.fingerprint).toMatch(HEX64);
    // Planning twice gives the same plan (deterministic).
    const again = kiln('plan', '--content', ws.content);
    expect(again.status, again.stderr).toBe(0);
    expect(JSON.parse(again.stdout)).toEqual(plan);
  });

  it('shards 1/3, 2/3, 3/3 gathered write byte for byte what a one-machine build writes', () => {
    const single = kiln('build', '--content', ws.content, '--out', at('single'), '--no-cache', '--quiet');
    expect(single.status, single.stderr).toBe(0);
    const counts: number[] = [];
    for (const [i, dir] of shards.entries()) {
      const r = kiln('build', '--content', ws.content, '--shard', `${i + 1}/3`, '--plan', planFile, '--out', dir, '--quiet');
      expect(r.status, r.stderr).toBe(0);
      // Job outputs only, no release trees.
      expect(existsSync(join(dir, 'releases'))).toBe(false);
      expect(existsSync(join(dir, 'shard.json'))).toBe(true);
      counts.push(readdirSync(join(dir, 'jobs')).filter((n) => HEX64.test(n)).length);
    }
    // Two jobs over three shards: one each for shards 1 and 2, shard 3 empty but valid.
    // Four jobs (2.0.0 and 2.1.0, two detectors each): job i in shard (i mod 3) + 1.
    expect(counts).toEqual([2, 1, 1]);
    const g = gather('gathered', shards, '--plan', planFile, '--quiet');
    expect(g.status, g.stderr).toBe(0);
    expect(g.stdout).toMatch(/3 shards, 4 jobs verified/);
    const want = treeDigest(at('single'));
    expect(Object.keys(want).length).toBeGreaterThan(20);
    expect(treeDigest(at('gathered'))).toEqual(want);
  });

  it('a missing shard is refused naming the missing job and the shard; nothing written', () => {
    const r = gather('no-shard-2', [shards[0], shards[2]]);
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr);
    expect(line).toContain('1 of 4 planned jobs missing: quillon-tarncam~2.0.0/bi1');
    expect(line).toContain('shard 2/3 not given or failed');
    expect(existsSync(at('no-shard-2'))).toBe(false);
  });

  it('a tampered job output is refused by its SHA-256, naming the job and the shard', () => {
    const copy = at('shard-1-tampered');
    cpSync(shards[0], copy, { recursive: true });
    const [fp] = readdirSync(join(copy, 'jobs')).filter((n) => HEX64.test(n));
    // Shard 1 holds two jobs; the one tampered with is named from its own meta.json.
    const job = (JSON.parse(readFileSync(join(copy, 'jobs', fp, 'meta.json'), 'utf8')) as { job: string }).job;
    const filesDir = join(copy, 'jobs', fp, 'files');
    const [name] = readdirSync(filesDir);
    const b = readFileSync(join(filesDir, name));
    b[b.length >> 1] ^= 0x01;
    writeFileSync(join(filesDir, name), b);
    const r = gather('tampered', [copy, shards[1], shards[2]]);
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr);
    expect(line).toContain(`job ${job} of shard 1/3 is damaged`);
    expect(line).toContain(`files/${name} does not match its SHA-256`);
    expect(existsSync(at('tampered'))).toBe(false);
  });

  it('a shard given twice is refused', () => {
    const r = gather('twice', [shards[0], shards[0], shards[1], shards[2]]);
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toContain('shard 1/3 is given twice');
  });

  it('a shard built by another Kiln version is refused naming it', () => {
    const copy = at('shard-2-other-version');
    cpSync(shards[1], copy, { recursive: true });
    const file = join(copy, 'shard.json');
    const m = JSON.parse(readFileSync(file, 'utf8')) as { generator: string };
    writeFileSync(file, JSON.stringify({ ...m, generator: 'kiln 0.0.1+0000000000000000' }));
    const r = gather('other-version', [shards[0], copy, shards[2]]);
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr);
    expect(line).toContain('shard 2/3 was built by another Kiln version');
    expect(line).toContain('kiln 0.0.1+0000000000000000');
  });

  it('bad --shard values are usage errors with a usage line (exit 2)', () => {
    for (const v of ['0/3', '4/3', 'x', '1/0', '-1/3', '1.5/3']) {
      const r = kiln('build', '--content', ws.content, '--shard', v, '--out', at('bad-shard'));
      expect(r.status, v).toBe(2);
      const line = expectOneLine(r.stderr);
      expect(line).toContain(`got "${v}"`);
      expect(line).toContain('usage: kiln build --shard K/N');
    }
    expect(existsSync(at('bad-shard'))).toBe(false);
    const noOut = kiln('build', '--content', ws.content, '--shard', '1/2');
    expect(noOut.status).toBe(2);
    expect(expectOneLine(noOut.stderr)).toContain('--shard K/N needs --out');
  });

  it('a plan of another content tree, and an edited plan, are refused by kiln build --shard', () => {
    // Another tree: the demo without detector bi1 in release 2.0.0.
    const other = workspace({ cache: 'cold' });
    try {
      const rel = other.read(RELEASE);
      const cut = rel.indexOf('\n  bi1:\n');
      expect(cut).toBeGreaterThan(0);
      other.write(RELEASE, rel.slice(0, cut + 1));
      rmSync(other.path('releases/2.0.0/linefits/bi1.csv'));
      const otherPlan = join(other.dir, 'plan.json');
      const p = kiln('plan', '--content', other.content, '--out', otherPlan);
      expect(p.status, p.stderr).toBe(0);
      const r = kiln('build', '--content', ws.content, '--shard', '1/2', '--plan', otherPlan, '--out', at('foreign'));
      expect(r.status).toBe(2);
      const line = expectOneLine(r.stderr);
      expect(line).toContain('plan was made from another content tree');
      expect(line).toContain(other.content);
    } finally {
      other.dispose();
    }
    const edited = at('edited-plan.json');
    const plan = JSON.parse(readFileSync(planFile, 'utf8')) as { jobs: unknown[] };
    writeFileSync(edited, JSON.stringify({ ...plan, jobs: plan.jobs.slice(1) }));
    const r = kiln('build', '--content', ws.content, '--shard', '1/2', '--plan', edited, '--out', at('edited'));
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toContain('plan file was edited');
    for (const d of ['foreign', 'edited']) expect(existsSync(at(d))).toBe(false);
  });

  // Last: edits the content tree.
  it('content changed after planning: the stale plan and the stale shards are refused naming the job', () => {
    ws.replace(RELEASE, 'readNoiseE: 3.9,', 'readNoiseE: 3.92,');
    const withPlan = gather('stale-plan', shards, '--plan', planFile);
    expect(withPlan.status).toBe(2);
    expect(expectOneLine(withPlan.stderr)).toContain('plan is stale: the inputs of job quillon-tarncam~2.0.0/fi0 changed since planning');
    const noPlan = gather('stale', shards);
    expect(noPlan.status).toBe(2);
    expect(expectOneLine(noPlan.stderr)).toContain('job quillon-tarncam~2.0.0/fi0 of shard 1/3 is stale');
    const shard = kiln('build', '--content', ws.content, '--shard', '1/3', '--plan', planFile, '--out', at('stale-shard'));
    expect(shard.status).toBe(2);
    expect(expectOneLine(shard.stderr)).toContain('plan is stale');
    for (const d of ['stale-plan', 'stale', 'stale-shard']) expect(existsSync(at(d))).toBe(false);
  });
});
