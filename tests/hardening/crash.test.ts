// Crash recovery: the real server (server/index.ts under tsx, a child process) on a temp data
// directory takes concurrent revision saves, review requests and decisions, and bench capture
// uploads from the demo engineer and reviewer; it is killed with SIGKILL while requests are in
// flight, and the directory is then opened again. Every acknowledged save must be there and verify
// against its hash, nothing half-written may be visible, and the server must work on the same
// directory afterwards. CRASH_ROUNDS sets the number of kill/restart rounds (3 by default),
// CRASH_ACKS how many acknowledged saves to wait for before each kill (12 by default).
import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { openDatabase } from '@/db/client';
import { createBackup } from '@/db/backup';
import { DataDirInUseError } from '@/db/dataDirLock';
import { demoAccounts } from '@/db/seed';
import { canonicalJson, sha256Hex } from '@/server/services/canonical';

const ROUNDS = Math.max(1, Number(process.env.CRASH_ROUNDS ?? 3));
const ACKS_BEFORE_KILL = Math.max(1, Number(process.env.CRASH_ACKS ?? 12));
const SAVE_WORKERS = 5;
jest.setTimeout(Math.max(600_000, ROUNDS * 240_000));

const root = path.resolve(__dirname, '..', '..');
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-crash-test-'));
const account = (role: string) => demoAccounts.find((a) => a.role === role)!;

// ---------------------------------------------------------------------------------------------
// the server process

interface Server {
  child: ChildProcess;
  base: string;
  output: () => string;
  exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
}

function startServer(): Promise<Server> {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    DATA_DIR: dataDir,
    PORT: '0',
    HOST: '127.0.0.1',
    WEB_DIR: '',
    NODE_ENV: 'test',
  };
  delete env.DATABASE_URL; // the embedded database is what is under test
  delete env.JWT_SECRET;
  delete env.SMTP_URL;
  // node --import tsx runs the server in this very process, so SIGKILL reaches the server itself
  // (the tsx command would start a second node process under it).
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'server', 'index.ts')], {
    cwd: root,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) =>
    child.once('exit', (code, signal) => resolve({ code, signal })),
  );
  return new Promise((resolve, reject) => {
    let serving = false;
    // Both pipes are read to the end, so that the child never blocks on a full pipe.
    child.stdout!.on('data', (chunk: Buffer) => {
      output += chunk.toString();
      const match = serving ? null : /Serving on http:\/\/localhost:(\d+)/.exec(output);
      if (match) {
        serving = true;
        resolve({ child, base: `http://127.0.0.1:${match[1]}`, output: () => output, exited });
      }
    });
    child.stderr!.on('data', (chunk: Buffer) => (output += chunk.toString()));
    void exited.then(({ code, signal }) => reject(new Error(`the server exited (${code ?? signal}) before serving:\n${output}`)));
  });
}

async function killHard(server: Server): Promise<void> {
  server.child.kill('SIGKILL');
  const { signal } = await server.exited;
  expect(signal).toBe('SIGKILL');
}

// ---------------------------------------------------------------------------------------------
// a small cookie-keeping HTTP client

class Client {
  private cookies = new Map<string, string>();
  userId = '';
  constructor(private readonly base: string) {}

  async call(method: string, url: string, body?: unknown): Promise<{ status: number; body: any }> {
    const headers: Record<string, string> = { cookie: [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ') };
    let payload: string | FormData | undefined;
    if (body instanceof FormData) payload = body;
    else if (body !== undefined) {
      headers['content-type'] = 'application/json';
      payload = JSON.stringify(body);
    }
    const res = await fetch(this.base + url, { method, headers, body: payload });
    for (const cookie of res.headers.getSetCookie()) {
      const [pair] = cookie.split(';');
      const at = pair.indexOf('=');
      this.cookies.set(pair.slice(0, at), pair.slice(at + 1));
    }
    const text = await res.text();
    let parsed: unknown = text;
    try {
      parsed = JSON.parse(text);
    } catch {
      // not JSON
    }
    return { status: res.status, body: parsed };
  }

  static async signIn(base: string, role: string): Promise<Client> {
    const client = new Client(base);
    const { email, password } = account(role);
    const res = await client.call('POST', '/api/auth/sign-in', { email, password });
    if (res.status !== 200) throw new Error(`sign-in as ${email}: ${res.status} ${JSON.stringify(res.body)}`);
    client.userId = res.body.user.id;
    return client;
  }
}

// ---------------------------------------------------------------------------------------------
// what the server acknowledged

interface Acks {
  revisions: Map<string, { sha256: string; designId: string; sequence: number; canonicalJson: string }>;
  reviews: Map<string, { revisionId: string }>;
  decisions: Map<string, 'approved' | 'changes-requested'>;
  captures: Map<string, { sha256: string }>;
}
const acks: Acks = { revisions: new Map(), reviews: new Map(), decisions: new Map(), captures: new Map() };
const figures = {
  rounds: 0,
  killedWithInFlight: [] as number[],
  unacknowledged: 0,
  refused: new Map<number, number>(),
  tempFilesLeft: 0,
  orphanFiles: 0,
  started: Date.now(),
};

function recordRevision(body: any) {
  acks.revisions.set(body.id, {
    sha256: body.sha256,
    designId: body.designId,
    sequence: body.sequence,
    canonicalJson: body.canonicalJson,
  });
}

/** A capture file with content unique to (round, n), a few hundred kB so that a kill can land in the write. */
function captureCsv(round: number, n: number): Buffer {
  const lines = [`# crash round ${round} capture ${n}`, 'time_us,v_mV'];
  for (let i = 0; i < 20_000; i++) lines.push(`${i},${Math.round(48_000 * (1 - Math.exp(-i / 3000)))}`);
  return Buffer.from(lines.join('\n') + '\n');
}
const MAPPING = { time: { column: 0, unit: 'us' }, channels: [{ column: 1, quantity: 'capacitorVoltage', unit: 'mV' }] };

/** Runs the load, kills the server under it, and returns the number of requests in flight then. */
async function drive(server: Server, round: number, designIds: string[]): Promise<number> {
  const sam = await Client.signIn(server.base, 'engineer');
  const priya = await Client.signIn(server.base, 'reviewer');
  const drafts = new Map<string, Record<string, unknown>>();
  for (const id of designIds) drafts.set(id, (await sam.call('GET', `/api/designs/${id}`)).body.draft);
  let inFlight = 0;
  let stopped = false;
  const track = async <T>(work: Promise<T>): Promise<T | null> => {
    inFlight++;
    try {
      return await work;
    } catch {
      figures.unacknowledged++; // the connection died with the server
      return null;
    } finally {
      inFlight--;
    }
  };
  const refused = (status: number) => figures.refused.set(status, (figures.refused.get(status) ?? 0) + 1);
  const [reviewDesign, captureDesign, ...saveDesigns] = designIds;

  const saveWorker = async (worker: number) => {
    for (let k = 0; !stopped; k++) {
      const designId = saveDesigns[(worker + k) % saveDesigns.length];
      const design = { ...drafts.get(designId)!, notes: `crash round ${round}, worker ${worker}, save ${k}` };
      const res = await track(
        sam.call('POST', `/api/designs/${designId}/revisions`, { note: `r${round} w${worker} #${k}`, design }),
      );
      if (!res) return;
      if (res.status === 201) recordRevision(res.body);
      else refused(res.status);
    }
  };
  const reviewWorker = async () => {
    for (let k = 0; !stopped; k++) {
      const design = { ...drafts.get(reviewDesign)!, notes: `crash round ${round}, review ${k}` };
      const saved = await track(sam.call('POST', `/api/designs/${reviewDesign}/revisions`, { note: `review ${k}`, design }));
      if (!saved) return;
      if (saved.status !== 201) {
        refused(saved.status);
        continue;
      }
      recordRevision(saved.body);
      const requested = await track(
        sam.call('POST', `/api/revisions/${saved.body.id}/reviews`, { reviewerIds: [priya.userId], note: `round ${round}` }),
      );
      if (!requested) return;
      if (requested.status !== 201) {
        refused(requested.status);
        continue;
      }
      const reviewId: string = requested.body.items[0].id;
      acks.reviews.set(reviewId, { revisionId: saved.body.id });
      const decision = k % 2 === 0 ? 'approved' : 'changes-requested';
      const decided = await track(
        decision === 'approved'
          ? priya.call('POST', `/api/reviews/${reviewId}/approve`, { comment: 'Looks right.' })
          : priya.call('POST', `/api/reviews/${reviewId}/request-changes`, { reason: 'Check the bleeder again.' }),
      );
      if (!decided) return;
      if (decided.status === 200) acks.decisions.set(reviewId, decision);
      else refused(decided.status);
    }
  };
  const captureWorker = async () => {
    for (let k = 0; !stopped; k++) {
      const form = new FormData();
      form.set('mapping', JSON.stringify(MAPPING));
      form.set('file', new Blob([new Uint8Array(captureCsv(round, k))], { type: 'text/csv' }), `scope-${round}-${k}.csv`);
      const res = await track(sam.call('POST', `/api/designs/${captureDesign}/captures`, form));
      if (!res) return;
      if (res.status === 201) acks.captures.set(res.body.id, { sha256: res.body.sha256 });
      else refused(res.status);
    }
  };

  const before = { revisions: acks.revisions.size, decisions: acks.decisions.size, captures: acks.captures.size };
  const workers = [...Array.from({ length: SAVE_WORKERS }, (_, w) => saveWorker(w)), reviewWorker(), captureWorker()];
  // Wait for enough acknowledged saves (and, unless that takes four times as many saves, a decision
  // and a capture), then kill at a random moment of the next half second, the workers still sending.
  const enough = () => {
    const saves = acks.revisions.size - before.revisions;
    if (saves < ACKS_BEFORE_KILL) return false;
    if (saves >= 4 * ACKS_BEFORE_KILL) return true;
    return acks.decisions.size > before.decisions && acks.captures.size > before.captures;
  };
  while (!enough()) await new Promise((r) => setTimeout(r, 10));
  await new Promise((r) => setTimeout(r, Math.random() * 500));
  const inFlightAtKill = inFlight;
  stopped = true;
  await killHard(server);
  await Promise.all(workers);
  return inFlightAtKill;
}

// ---------------------------------------------------------------------------------------------
// what must hold on disk after the crash

async function checkDataDir(): Promise<{ revisions: number }> {
  const handle = await openDatabase({ dataDir });
  try {
    const q = async <T>(sql: string) => (await handle.pg.query<T>(sql)).rows;
    // Every acknowledged revision is there, with the hash it was acknowledged with, and that hash
    // is the SHA-256 of the canonical JSON stored.
    const stored = new Map(
      (
        await q<{ id: string; sha256: string; design_json: string; design_id: string; sequence: number }>(
          'select id, sha256, design_json, design_id, sequence from revisions',
        )
      ).map((r) => [r.id, r]),
    );
    for (const [id, ack] of acks.revisions) {
      const row = stored.get(id);
      expect({ id, present: !!row }).toEqual({ id, present: true });
      expect({ id, sha256: row!.sha256, designId: row!.design_id, sequence: row!.sequence, json: row!.design_json }).toEqual({
        id,
        sha256: ack.sha256,
        designId: ack.designId,
        sequence: ack.sequence,
        json: ack.canonicalJson,
      });
    }
    for (const row of stored.values()) {
      expect({ id: row.id, hash: sha256Hex(row.design_json) }).toEqual({ id: row.id, hash: row.sha256 });
      expect(canonicalJson(JSON.parse(row.design_json))).toBe(row.design_json);
    }
    // Nothing half-written: what saveRevision writes in one transaction is all there or all absent.
    expect(
      await q(
        `select r.id from revisions r left join analysis_runs a on a.revision_id = r.id and a.kind = 'check' where a.id is null`,
      ),
    ).toEqual([]);
    expect(
      await q(
        `select r.id from revisions r where (select count(*) from audit_log l where l.action = 'revision.saved' and l.entity_id = r.id::text) <> 1`,
      ),
    ).toEqual([]);
    expect(
      await q(
        `select l.entity_id from audit_log l where l.action = 'revision.saved' and not exists (select 1 from revisions r where r.id::text = l.entity_id)`,
      ),
    ).toEqual([]);
    expect(
      await q(`select d.id, d.revision_count, count(r.id)::int as n, coalesce(max(r.sequence), 0) as top
                 from designs d left join revisions r on r.design_id = d.id
                group by d.id having d.revision_count <> count(r.id) or d.revision_count <> coalesce(max(r.sequence), 0)`),
    ).toEqual([]);
    expect(
      await q(`select d.id from designs d where d.revision_count > 0 and d.latest_revision_id is distinct from
                 (select r.id from revisions r where r.design_id = d.id order by r.sequence desc limit 1)`),
    ).toEqual([]);
    // Reviews: acknowledged ones are there, decisions as acknowledged, and every review came with
    // its audit entry; a decided review carries its decision.
    const reviewRows = new Map(
      (await q<{ id: string; state: string; revision_id: string }>('select id, state, revision_id from reviews')).map((r) => [
        r.id,
        r,
      ]),
    );
    for (const [id, ack] of acks.reviews)
      expect({ id, revisionId: reviewRows.get(id)?.revision_id }).toEqual({ id, revisionId: ack.revisionId });
    for (const [id, state] of acks.decisions) expect({ id, state: reviewRows.get(id)?.state }).toEqual({ id, state });
    expect(
      await q(`select v.id from reviews v where not exists (select 1 from audit_log l where l.action = 'review.requested'
                 and l.details->>'requestId' = v.request_id::text)`),
    ).toEqual([]);
    expect(
      await q(`select v.id from reviews v join revisions r on r.id = v.revision_id where v.state = 'approved'
                 and (v.approved_sha256 is distinct from r.sha256 or v.decided_at is null or v.checks_snapshot is null)`),
    ).toEqual([]);
    expect(
      await q(`select id from reviews where state = 'changes-requested' and (decided_at is null or decision_reason is null)`),
    ).toEqual([]);
    // Captures: every row has its file, whole; a file under its final name is never torn.
    const uploads = path.join(dataDir, 'uploads');
    const files = fs.existsSync(uploads) ? fs.readdirSync(uploads) : [];
    const captures = await q<{ id: string; stored_as: string; sha256: string; byte_size: number }>(
      'select id, stored_as, sha256, byte_size from bench_captures',
    );
    for (const [id, ack] of acks.captures)
      expect({ id, sha256: captures.find((c) => c.id === id)?.sha256 }).toEqual({ id, sha256: ack.sha256 });
    for (const c of captures) {
      const file = path.join(uploads, c.stored_as);
      expect({ id: c.id, file: fs.existsSync(file) }).toEqual({ id: c.id, file: true });
      const bytes = fs.readFileSync(file);
      expect({ id: c.id, hash: crypto.createHash('sha256').update(bytes).digest('hex'), size: bytes.length }).toEqual({
        id: c.id,
        hash: c.sha256,
        size: c.byte_size,
      });
    }
    const finalNames = files.filter((f) => /^[0-9a-f]{64}$/.test(f));
    for (const name of finalNames)
      expect(
        crypto
          .createHash('sha256')
          .update(fs.readFileSync(path.join(uploads, name)))
          .digest('hex'),
      ).toBe(name);
    // Left by a kill between writing the file and committing its row, or in the middle of the
    // write: invisible (no row points at them), counted for the report.
    const referenced = new Set(captures.map((c) => c.stored_as));
    figures.orphanFiles = finalNames.filter((f) => !referenced.has(f)).length;
    figures.tempFilesLeft = files.filter((f) => f.endsWith('.tmp')).length;
    expect(files.filter((f) => !/^[0-9a-f]{64}$/.test(f) && !/^\.[0-9a-f]{64}\.[0-9a-f]{12}\.tmp$/.test(f))).toEqual([]);
    return { revisions: stored.size };
  } finally {
    await handle.close();
  }
}

afterAll(() => {
  fs.rmSync(dataDir, { recursive: true, force: true });
});

it(`keeps every acknowledged save through ${ROUNDS} SIGKILL rounds, with nothing half-written`, async () => {
  let designIds: string[] = [];
  let lastCheck = { revisions: 0 };
  for (let round = 1; round <= ROUNDS; round++) {
    const server = await startServer();
    try {
      if (round === 1) {
        // A backup cannot open the directory under a running server: it says who holds it.
        await expect(createBackup({ dataDir, out: path.join(dataDir, '..', `crash-${process.pid}.tar.gz`) })).rejects.toThrow(
          DataDirInUseError,
        );
        await expect(createBackup({ dataDir, out: path.join(dataDir, '..', `crash-${process.pid}.tar.gz`) })).rejects.toThrow(
          new RegExp(`in use by process ${server.child.pid}`),
        );
        const sam = await Client.signIn(server.base, 'engineer');
        const designs = (await sam.call('GET', '/api/designs?limit=50')).body.items as { id: string; name: string }[];
        // The review chain, the captures, then the designs the save workers share.
        const pick = (re: RegExp) => designs.find((d) => re.test(d.name))?.id;
        designIds = [...new Set([pick(/Scooter/), pick(/Cargo/), ...designs.map((d) => d.id)])].filter(
          (id): id is string => !!id,
        );
        expect(designIds).toHaveLength(5);
      } else {
        // The directory from the last round serves again: the acknowledged revisions read back.
        const sam = await Client.signIn(server.base, 'engineer');
        const sample = [...acks.revisions.keys()].slice(-5);
        for (const id of sample) {
          const res = await sam.call('GET', `/api/revisions/${id}`);
          expect({ id, status: res.status, sha256: res.body.sha256 }).toEqual({
            id,
            status: 200,
            sha256: acks.revisions.get(id)!.sha256,
          });
        }
      }
      const inFlight = await drive(server, round, designIds);
      figures.killedWithInFlight.push(inFlight);
      expect(inFlight).toBeGreaterThan(0);
    } finally {
      if (server.child.exitCode === null && server.child.signalCode === null) {
        server.child.kill('SIGKILL');
        await server.exited;
      }
    }
    lastCheck = await checkDataDir();
    figures.rounds = round;
  }

  // After the last crash: the server starts on the same directory and works as usual.
  const server = await startServer();
  try {
    const sam = await Client.signIn(server.base, 'engineer');
    const priya = await Client.signIn(server.base, 'reviewer');
    for (const [id, ack] of acks.revisions) {
      const res = await sam.call('GET', `/api/revisions/${id}/verify`);
      expect({
        id,
        status: res.status,
        sha256: res.body.sha256,
        hashMatches: res.body.hashMatches,
        reproduced: res.body.reproduced,
      }).toEqual({
        id,
        status: 200,
        sha256: ack.sha256,
        hashMatches: true,
        reproduced: true,
      });
    }
    const saved = await sam.call('POST', `/api/designs/${designIds[0]}/revisions`, { note: 'after the crashes' });
    expect(saved.status).toBe(201);
    const requested = await sam.call('POST', `/api/revisions/${saved.body.id}/reviews`, {
      reviewerIds: [priya.userId],
      note: 'after',
    });
    expect(requested.status).toBe(201);
    expect((await priya.call('POST', `/api/reviews/${requested.body.items[0].id}/approve`, {})).status).toBe(200);
    server.child.kill('SIGTERM');
    expect((await server.exited).code).toBe(0);
  } finally {
    if (server.child.exitCode === null && server.child.signalCode === null) server.child.kill('SIGKILL');
  }

  const seconds = ((Date.now() - figures.started) / 1000).toFixed(0);
  console.log(
    `[crash] ${figures.rounds} SIGKILL rounds in ${seconds} s: ${acks.revisions.size} revision saves acknowledged and checked ` +
      `(${lastCheck.revisions} revisions on disk), ${acks.reviews.size} review requests and ${acks.decisions.size} decisions, ` +
      `${acks.captures.size} captures acknowledged; requests in flight at each kill: ${figures.killedWithInFlight.join(', ')}; ` +
      `${figures.unacknowledged} requests cut off; refused under contention: ${JSON.stringify(Object.fromEntries(figures.refused))}; ` +
      `upload temp files left: ${figures.tempFilesLeft}, unreferenced capture files: ${figures.orphanFiles}.`,
  );
});
