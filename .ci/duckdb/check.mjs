// check.mjs: open every Parquet file of a plumb run folder with DuckDB, a reader independent of
// the Go code that wrote them, and check that what a notebook user would query comes back right.
//
//   node .ci/duckdb/check.mjs [--expect EXPECT.json] [--require-profiles] RUN_DIR
//
// Without --expect it checks only what the files say about themselves (every file opens and has
// rows, the plumb metadata keys are there and the units cover every column, samples have the
// fixed columns, profile bands are ordered). With --expect (written by the Go test
// inversion.TestDemoRecoversTruth from what the Go side read and computed) it also compares row
// counts, column names and types, units, quantiles, category probabilities and the density band
// with the Go values. A profiles section in EXPECT.json, or --require-profiles, makes a missing
// profiles/ folder an error. Exit status 0 when every check passes, 1 when one fails (each failure
// is printed on its own line), 2 for bad usage.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';

// The notebook queries of runs/README.md, written with the demo's folder. They must stay
// identical to the DuckDB example there: checkReadme fails when the README does not contain them
// verbatim, so a researcher pasting the documented SQL runs exactly what CI ran.
const README_RUN_DIR = 'runs/demo/run';
const BAND_SQL = `SELECT radius_km,
       quantile_cont(density_kg_m3, 0.05) AS density_lower_kg_m3,
       quantile_cont(density_kg_m3, 0.5) AS density_median_kg_m3,
       quantile_cont(density_kg_m3, 0.95) AS density_upper_kg_m3
FROM read_parquet('runs/demo/run/profiles/*.parquet')
GROUP BY radius_km
ORDER BY radius_km;`;
const LIQUID_SQL = `SELECT avg(CASE WHEN core_state = 'liquid' THEN 1 ELSE 0 END) AS p_core_liquid
FROM read_parquet('runs/demo/run/samples/*.parquet');`;

// Go computes quantiles with its own type-7 code (inversion/mcmc.Quantile7) and DuckDB with
// quantile_cont, the same definition; the two may round the last interpolation step
// differently, so they are compared to a relative 1e-9 (far below any MCSE, far above rounding).
const REL_TOL = 1e-9;

// DuckDB's names for the three column kinds plumb writes (inversion/store: DOUBLE, INT64,
// BYTE_ARRAY annotated STRING).
const DUCK_TYPE = { float64: 'DOUBLE', int64: 'BIGINT', string: 'VARCHAR' };

// Columns every samples table has, whatever the config (inversion/columns.go).
const SAMPLE_FIXED = ['chain', 'draw', 'log_prior', 'log_likelihood', 'log_posterior'];
// Columns of the long-format profiles table (profiles schema, version 1).
const PROFILE_COLUMNS = {
  chain: 'BIGINT', draw: 'BIGINT', radius_km: 'DOUBLE', layer: 'VARCHAR', density_kg_m3: 'DOUBLE',
  vp_km_s: 'DOUBLE', vs_km_s: 'DOUBLE', gravity_m_s2: 'DOUBLE', pressure_gpa: 'DOUBLE',
};

const failures = [];
const lines = [];
// DuckDB error messages can span several lines (the query, a caret); the first one says it.
const fail = (msg) => failures.push(msg.split('\n')[0]);
const say = (msg) => lines.push(msg);

function usage(msg) {
  console.error(`check.mjs: ${msg}\nusage: node check.mjs [--expect EXPECT.json] [--require-profiles] RUN_DIR`);
  process.exit(2);
}

function parseArgs(argv) {
  const a = { expect: null, requireProfiles: false, dir: null };
  for (let i = 0; i < argv.length; i++) {
    if (argv[i] === '--expect') {
      if (i + 1 >= argv.length) usage('--expect needs a file');
      a.expect = argv[++i];
    } else if (argv[i] === '--require-profiles') {
      a.requireProfiles = true;
    } else if (argv[i].startsWith('-')) {
      usage(`unknown option ${argv[i]}`);
    } else if (a.dir === null) {
      a.dir = argv[i];
    } else {
      usage(`more than one RUN_DIR (${a.dir}, ${argv[i]})`);
    }
  }
  if (a.dir === null) usage('no RUN_DIR');
  return a;
}

// sqlString quotes s as an SQL string literal.
const sqlString = (s) => `'${s.replaceAll("'", "''")}'`;

// forRun turns one of the README queries into the same query on dir.
const forRun = (sql, dir) => sql.replaceAll(sqlString(README_RUN_DIR + '/').slice(0, -1), () => sqlString(dir + '/').slice(0, -1));

// parquetFiles lists every *.parquet file under dir, recursively, sorted.
function parquetFiles(dir) {
  const out = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...parquetFiles(p));
    else if (e.isFile() && e.name.endsWith('.parquet')) out.push(p);
  }
  return out.sort();
}

const isDir = (p) => { try { return statSync(p).isDirectory(); } catch { return false; } };

const close = (a, b) => Math.abs(a - b) <= REL_TOL * Math.max(1, Math.abs(a), Math.abs(b));

async function main() {
  const args = parseArgs(process.argv.slice(2));
  const dir = resolve(args.dir);
  if (!isDir(dir)) usage(`${args.dir}: not a folder`);
  let expect = null;
  if (args.expect) {
    try {
      expect = JSON.parse(readFileSync(args.expect, 'utf8'));
    } catch (e) {
      usage(`--expect ${args.expect}: ${e.message}`);
    }
  }
  const needProfiles = args.requireProfiles || Boolean(expect && expect.profiles);

  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  const rows = async (sql) => (await con.runAndReadAll(sql)).getRowObjectsJS();
  const version = (await rows('SELECT version() AS v'))[0].v;
  say(`DuckDB ${version} (@duckdb/node-api), run folder ${dir}`);

  // A table whose files DuckDB cannot read fails its queries; report that and go on with the
  // other tables (checkEveryFile has already named the unreadable file).
  const guarded = async (table, check) => {
    try {
      await check();
    } catch (e) {
      fail(`${table}/: query failed: ${e.message}`);
    }
  };
  checkReadme();
  const counts = await checkEveryFile(dir, rows, expect);
  await guarded('samples', () => checkSamples(dir, rows, expect, counts));
  if (isDir(join(dir, 'profiles'))) {
    await guarded('profiles', () => checkProfiles(dir, rows, expect, counts));
  } else if (needProfiles) {
    fail(`${join(dir, 'profiles')}: missing, but the run should have profiles`);
  } else {
    say('profiles/: none (not required for this run)');
  }
  if (isDir(join(dir, 'sample_stats'))) {
    await guarded('sample_stats', async () => {
      const { all, files } = await tableRows(dir, 'sample_stats', rows, counts);
      say(`sample_stats/: ${files} files, ${all} rows (= sum over files)`);
    });
  }
  con.closeSync();
  db.closeSync();

  for (const l of lines) console.log(l);
  if (failures.length > 0) {
    for (const f of failures) console.error(`FAIL: ${f}`);
    console.error(`duckdb check: ${failures.length} failure(s) in ${dir}`);
    process.exit(1);
  }
  console.log('duckdb check: OK');
}

// checkReadme fails when runs/README.md does not hold the queries this script runs.
function checkReadme() {
  const path = new URL('../../runs/README.md', import.meta.url);
  let text;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    fail(`runs/README.md: cannot read it (${e.message}); its DuckDB example must match this script`);
    return;
  }
  for (const [name, sql] of [['density band', BAND_SQL], ['P(core liquid)', LIQUID_SQL]]) {
    if (!text.includes(sql)) fail(`runs/README.md: the ${name} query differs from the one in .ci/duckdb/check.mjs; keep them identical`);
  }
}

// checkEveryFile opens every Parquet file under dir: it must have rows, the plumb version, and
// units (JSON) for exactly its columns. It returns the row count of each file, by path.
async function checkEveryFile(dir, rows, expect) {
  const files = parquetFiles(dir);
  const counts = new Map();
  if (files.length === 0) {
    fail(`${dir}: no Parquet files`);
    return counts;
  }
  const versions = new Set();
  let clean = 0;
  for (const f of files) {
    const rel = relative(dir, f);
    const before = failures.length;
    try {
      const n = Number((await rows(`SELECT count(*) AS n FROM read_parquet(${sqlString(f)})`))[0].n);
      counts.set(f, n);
      if (!(n > 0)) fail(`${rel}: ${n} rows, want > 0`);
      const cols = (await rows(`DESCRIBE SELECT * FROM read_parquet(${sqlString(f)})`)).map((r) => r.column_name);
      const kv = new Map((await rows(`SELECT decode(key) AS k, decode(value) AS v FROM parquet_kv_metadata(${sqlString(f)})`)).map((r) => [r.k, r.v]));
      const v = kv.get('plumb.version');
      if (!v) fail(`${rel}: no plumb.version in the key-value metadata`);
      else versions.add(v);
      if (v && expect && v !== expect.plumb_version) fail(`${rel}: plumb.version ${v}, want ${expect.plumb_version}`);
      const unitsText = kv.get('plumb.units');
      if (unitsText === undefined) {
        fail(`${rel}: no plumb.units in the key-value metadata`);
        continue;
      }
      let units;
      try {
        units = JSON.parse(unitsText);
      } catch (e) {
        fail(`${rel}: plumb.units is not JSON (${e.message})`);
        continue;
      }
      const keys = Object.keys(units).sort();
      const want = [...cols].sort();
      if (JSON.stringify(keys) !== JSON.stringify(want)) {
        fail(`${rel}: plumb.units names [${keys}] but the file has columns [${want}]`);
      }
      const table = rel.split(/[\\/]/)[0];
      const wantUnits = expect?.[table]?.columns;
      if (wantUnits) {
        for (const c of wantUnits) {
          if (units[c.name] !== c.unit) fail(`${rel}: unit of ${c.name} is ${JSON.stringify(units[c.name])}, Go read ${JSON.stringify(c.unit)}`);
        }
      }
    } catch (e) {
      fail(`${rel}: DuckDB cannot read it: ${e.message}`);
    }
    if (failures.length === before) clean++;
  }
  say(`every file: ${clean} of ${files.length} Parquet files read with rows, plumb.version (${[...versions].join(', ')}) and plumb.units for every column`);
  return counts;
}

// tableRows sums the per-file row counts of one table folder and compares it with DuckDB's count
// over the whole folder.
async function tableRows(dir, table, rows, counts) {
  let sum = 0;
  let files = 0;
  for (const [f, n] of counts) {
    if (relative(dir, f).split(/[\\/]/)[0] === table) {
      sum += n;
      files++;
    }
  }
  const glob = join(dir, table, '*.parquet');
  const all = Number((await rows(`SELECT count(*) AS n FROM read_parquet(${sqlString(glob)})`))[0].n);
  if (all !== sum) fail(`${table}/: ${all} rows over the folder, but its files add up to ${sum}`);
  return { all, files, glob };
}

// checkSchema compares DuckDB's column types of a table with the ones Go read.
async function checkSchema(table, glob, rows, want) {
  const got = new Map((await rows(`DESCRIBE SELECT * FROM read_parquet(${sqlString(glob)})`)).map((r) => [r.column_name, r.column_type]));
  for (const [name, type] of Object.entries(want)) {
    if (!got.has(name)) fail(`${table}/: no column ${name}`);
    else if (got.get(name) !== type) fail(`${table}/: column ${name} is ${got.get(name)} in DuckDB, want ${type}`);
  }
  return got;
}

async function checkSamples(dir, rows, expect, counts) {
  if (!isDir(join(dir, 'samples'))) {
    fail(`${join(dir, 'samples')}: missing`);
    return;
  }
  const e = expect?.samples;
  const { all, files, glob } = await tableRows(dir, 'samples', rows, counts);
  if (e && all !== e.rows) fail(`samples/: DuckDB counts ${all} rows, Go read ${e.rows}`);

  const want = Object.fromEntries(SAMPLE_FIXED.map((c) => [c, c === 'chain' || c === 'draw' ? 'BIGINT' : 'DOUBLE']));
  for (const p of e?.parameters ?? []) want[p] = 'DOUBLE';
  for (const c of Object.keys(e?.categorical ?? {})) want[c] = 'VARCHAR';
  for (const c of e?.columns ?? []) want[c.name] = DUCK_TYPE[c.kind] ?? `unknown kind ${c.kind}`;
  const got = await checkSchema('samples', glob, rows, want);
  if (e) {
    const extra = [...got.keys()].filter((c) => !e.columns.some((x) => x.name === c));
    if (extra.length > 0) fail(`samples/: DuckDB sees columns Go did not read: ${extra}`);
  }

  const keys = Number((await rows(`SELECT count(*) AS n FROM (SELECT DISTINCT chain, draw FROM read_parquet(${sqlString(glob)}))`))[0].n);
  if (keys !== all) fail(`samples/: ${all} rows but ${keys} distinct (chain, draw) pairs`);

  let maxRel = 0;
  const qs = e?.quantiles ?? [];
  if (qs.length > 0) {
    const sel = qs.map((q, i) => `quantile_cont("${q.column}", ${q.p}) AS q${i}`).join(', ');
    const r = (await rows(`SELECT ${sel} FROM read_parquet(${sqlString(glob)})`))[0];
    qs.forEach((q, i) => {
      const v = r[`q${i}`];
      if (!close(v, q.value)) fail(`samples/: quantile_cont(${q.column}, ${q.p}) = ${v}, Go computed ${q.value}`);
      maxRel = Math.max(maxRel, Math.abs(v - q.value) / Math.max(1, Math.abs(q.value)));
    });
  }
  let cats = '';
  for (const [c, probs] of Object.entries(e?.categorical ?? {})) {
    const r = await rows(`SELECT "${c}" AS level, count(*) AS n FROM read_parquet(${sqlString(glob)}) GROUP BY 1 ORDER BY 1`);
    const share = Object.fromEntries(r.map((x) => [x.level, Number(x.n) / all]));
    for (const { level } of r) {
      if (typeof level !== 'string' || !Object.hasOwn(probs, level)) fail(`samples/: ${c} has level ${JSON.stringify(level)}, not one of ${Object.keys(probs)}`);
    }
    for (const [level, p] of Object.entries(probs)) {
      if (!close(share[level] ?? 0, p)) fail(`samples/: P(${c} = ${level}) = ${share[level] ?? 0} in DuckDB, Go computed ${p}`);
    }
    cats += ` P(${c}) ${JSON.stringify(share)};`;
  }
  if (got.has('core_state')) {
    const p = (await rows(forRun(LIQUID_SQL, dir)))[0].p_core_liquid;
    const want = e?.categorical?.core_state?.liquid;
    if (want !== undefined && !close(p, want)) fail(`samples/: the README's P(core liquid) query gives ${p}, Go computed ${want}`);
    cats += ` README P(core liquid) query ${p.toFixed(4)};`;
  }
  say(`samples/: ${files} files, ${all} rows (= sum over files${e ? ' = Go' : ''}), ${got.size} columns, unique (chain, draw);` +
    (qs.length > 0 ? ` ${qs.length} quantiles agree with Go (max rel. diff ${maxRel.toExponential(1)});` : ' no Go quantiles to compare (no --expect);') + cats);
}

async function checkProfiles(dir, rows, expect, counts) {
  const e = expect?.profiles;
  const { all, files, glob } = await tableRows(dir, 'profiles', rows, counts);
  if (e && all !== e.rows) fail(`profiles/: DuckDB counts ${all} rows, Go read ${e.rows}`);
  const want = { ...PROFILE_COLUMNS };
  for (const c of e?.columns ?? []) want[c.name] = DUCK_TYPE[c.kind] ?? `unknown kind ${c.kind}`;
  await checkSchema('profiles', glob, rows, want);

  const band = await rows(forRun(BAND_SQL, dir));
  let disorder = 0;
  for (const b of band) {
    if (!(b.density_lower_kg_m3 <= b.density_median_kg_m3 && b.density_median_kg_m3 <= b.density_upper_kg_m3)) {
      if (disorder++ < 5) fail(`profiles/: at ${b.radius_km} km the band is not ordered: ${b.density_lower_kg_m3} ≤ ${b.density_median_kg_m3} ≤ ${b.density_upper_kg_m3} fails`);
    }
  }
  if (disorder > 5) fail(`profiles/: ${disorder} radii with an unordered band in all`);
  let maxRel = 0;
  if (e) {
    if (band.length !== e.band.length) {
      fail(`profiles/: the band query returns ${band.length} rows, want one per grid radius (${e.band.length})`);
    } else {
      let bad = 0;
      band.forEach((b, i) => {
        const g = e.band[i];
        const pairs = [[b.density_lower_kg_m3, g.lower], [b.density_median_kg_m3, g.median], [b.density_upper_kg_m3, g.upper]];
        const ok = b.radius_km === g.radius_km && pairs.every(([x, y]) => close(x, y));
        for (const [x, y] of pairs) maxRel = Math.max(maxRel, Math.abs(x - y) / Math.max(1, Math.abs(y)));
        if (!ok && bad++ < 5) fail(`profiles/: band row ${i}: DuckDB ${JSON.stringify(b)}, Go ${JSON.stringify(g)}`);
      });
      if (bad > 5) fail(`profiles/: ${bad} band rows differ from Go in all`);
    }
  }
  const span = band.length > 0 ? `${band[0].radius_km}–${band[band.length - 1].radius_km} km` : 'none';
  say(`profiles/: ${files} files, ${all} rows${e ? ' (= Go)' : ''}; band query: ${band.length} radii (${span}), lower ≤ median ≤ upper everywhere` +
    (e ? `, equal to Go's band (max rel. diff ${maxRel.toExponential(1)})` : ''));
}

main().catch((err) => {
  console.error(`duckdb check: ${err.stack || err}`);
  process.exit(1);
});
