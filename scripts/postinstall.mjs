// Nothing to fetch after install: the browser tests use Debian's chromium, never a download.
// This only reminds a new user what the test line will install through apt when missing.
import { existsSync } from 'node:fs';
if (!existsSync('/usr/bin/chromium')) {
  console.log('corewright: /usr/bin/chromium is missing; `npm test` installs Debian\'s chromium package when it can.');
}
