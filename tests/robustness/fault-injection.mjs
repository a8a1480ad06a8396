// Loaded with `node --import` by tests/robustness/output-faults.test.ts, to put a fault where a
// test cannot make the machine produce it. MYOFOLIO_TEST_FAULT:
//   enospc:N  every synchronous write of an .html page after the N-th fails with ENOSPC (a disk
//             that fills up while Eleventy writes the pages)
//   never     the writing of chart files (.svg) never finishes (a promise that never settles)
import fs from 'node:fs';
import { syncBuiltinESMExports } from 'node:module';

const [what, after] = (process.env.MYOFOLIO_TEST_FAULT ?? '').split(':');
let n = 0;
if (what === 'enospc') {
  const write = fs.writeFileSync;
  fs.writeFileSync = (...args) => {
    if (String(args[0]).endsWith('.html') && ++n > Number(after)) {
      throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC', errno: -28, syscall: 'write' });
    }
    return write(...args);
  };
}
if (what === 'never') {
  const write = fs.promises.writeFile;
  fs.promises.writeFile = (...args) => (String(args[0]).endsWith('.svg') ? new Promise(() => {}) : write(...args));
}
syncBuiltinESMExports();
