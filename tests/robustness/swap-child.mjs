// One build's output steps, as src/pipeline/build-study.ts takes them, with the site's content
// copied from a finished site; kills itself (SIGKILL) when the step named by argv[5] is reached.
// Used by tests/robustness/output-faults.test.ts: node swap-child.mjs <study> <out> <content> <force|-> <step|->
import { cpSync, realpathSync } from 'node:fs';
import { makeStaging, planOutput, swapIn } from '../../dist/pipeline/output.js';

const [study, out, content, force, killAt] = process.argv.slice(2);
const step = (name) => {
  if (name === killAt) process.kill(process.pid, 'SIGKILL');
};
const plan = planOutput(study, out, force === 'force');
const staging = makeStaging(plan, step);
cpSync(realpathSync(content), staging, { recursive: true });
step('content');
swapIn(plan, staging, 'now', step);
process.stdout.write('done\n');
