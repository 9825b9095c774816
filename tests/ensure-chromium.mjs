// Makes sure Debian's Chromium is present for the browser tests: installs it when running as root,
// otherwise stops with a message saying how. No test tool downloads a browser of its own.
import { existsSync } from 'node:fs';
import { execSync } from 'node:child_process';

const CHROMIUM = process.env.RUNGBOOK_CHROMIUM ?? '/usr/bin/chromium';
if (!existsSync(CHROMIUM)) {
  const root = typeof process.getuid === 'function' && process.getuid() === 0;
  if (!root) {
    console.error(`Chromium not found at ${CHROMIUM}. Install it with: sudo apt-get update && sudo apt-get install -y chromium`);
    process.exit(1);
  }
  console.log('Installing Debian chromium for the browser tests…');
  execSync('apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium', { stdio: 'inherit' });
  if (!existsSync(CHROMIUM)) {
    console.error(`Chromium still missing at ${CHROMIUM} after apt-get install.`);
    process.exit(1);
  }
}
