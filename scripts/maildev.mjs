#!/usr/bin/env node
// The local mail catcher, bound to loopback only (SMTP and web inbox both).
// Usage: node scripts/maildev.mjs [smtpPort=1025] [webPort=1080]
// Each catcher keeps its mail in a folder of its own (maildev's default, /tmp/maildev, is shared
// by every catcher on the machine, so one emptying its inbox removed another's mail mid-delivery).
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';

const [smtp = '1025', web = '1080'] = process.argv.slice(2);
const bin = path.resolve('node_modules/maildev/dist/bin/maildev.js');
if (!fs.existsSync(bin)) {
  console.error(
    'The local mail catcher (maildev) is a development dependency: run `npm install` (a production install, `npm ci --omit=dev`, leaves it out; point SMTP_URL at a relay instead).',
  );
  process.exit(1);
}
const dir = fs.mkdtempSync(path.join(os.tmpdir(), `oscillab-maildev-${smtp}-`));
const child = spawn(process.execPath, [bin, '--ip', '127.0.0.1', '--web-ip', '127.0.0.1', '-s', smtp, '-w', web, '--mail-directory', dir], {
  stdio: 'inherit',
});
for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig));
child.on('exit', (code) => {
  fs.rmSync(dir, { recursive: true, force: true });
  process.exit(code ?? 0);
});
