/**
 * `node --import ./record-loads.mjs ...`: appends the URL of every module the process loads to
 * the file named by LOOPRIG_LOAD_LOG, one per line (a module resolve hook, Node >= 20.6). Used by
 * test/cli/startup.test.ts and test/bench/startup.bench.ts to see what start-up really loads.
 */
import { register } from 'node:module';

const hooks = `
import { appendFileSync } from 'node:fs';
const log = process.env.LOOPRIG_LOAD_LOG;
export async function resolve(spec, context, next) {
  const r = await next(spec, context);
  if (log) appendFileSync(log, r.url + '\\n');
  return r;
}
`;
register(`data:text/javascript,${encodeURIComponent(hooks)}`);
