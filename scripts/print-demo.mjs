// Prints the demo sign-ins after start-up (the list lives in lib/demo/users.ts).
import { readFileSync } from 'node:fs';

const src = readFileSync(new URL('../lib/demo/users.ts', import.meta.url), 'utf8');
const password = src.match(/DEMO_PASSWORD = '([^']+)'/)?.[1];
const users = [...src.matchAll(/email: '([^']+)', name: '([^']+)', role: '([^']+)', note: '([^']+)'/g)];
const url = process.env.APP_URL ?? 'http://localhost:3000';
const mail = process.env.MAIL_WEB_URL ?? 'http://127.0.0.1:1080';
console.log(`\n  Fieldmark — ${url}\n  Demo sign-ins (password for all: ${password})`);
for (const [, email, name, role, note] of users) console.log(`    ${email.padEnd(30)} ${role.padEnd(13)} ${name} (${note})`);
console.log(`  Outgoing mail (invitations, reports) is caught by the local sink: ${mail}\n`);
