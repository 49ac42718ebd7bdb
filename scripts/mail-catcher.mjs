// The local mail catcher: an SMTP server on loopback (smtp-server) that keeps every message it is
// given as a file under the data folder (data/mail/<id>.eml) and lists them in data/mail/index.json.
// `npm start` runs it when SMTP_URL is not set; the end-to-end tests run it beside `next start`;
// the integration tests start it on a random port. Admins read the messages on /mail.
//
//   node scripts/mail-catcher.mjs [--port 2525] [--dir data/mail] [-- command args…]
//
// With a command, the catcher starts first and the command runs with SMTP_URL and MAIL_CATCHER_DIR
// pointing at it; the catcher stops when the command exits.
import { SMTPServer } from 'smtp-server';
import { spawn } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdirSync, readFileSync, renameSync, writeFileSync, existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** Largest message kept, bytes (our messages are a few KiB; this only stops abuse). */
const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

/** The Subject header of a raw message, unfolded but not decoded (the reader decodes it). */
function rawSubject(buf) {
  const head = buf.subarray(0, Math.min(buf.length, 64 * 1024)).toString('latin1');
  const end = head.search(/\r?\n\r?\n/);
  const lines = (end >= 0 ? head.slice(0, end) : head).replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/);
  const line = lines.find((l) => /^subject:/i.test(l));
  return line ? line.slice(8).trim() : '';
}

/**
 * Starts a catcher on `host:port` (port 0: any free port) storing messages in `dir`.
 * Resolves once it listens; `close()` stops it.
 */
export async function startCatcher({ dir, port = 0, host = '127.0.0.1', quiet = false } = {}) {
  if (!dir) throw new Error('startCatcher: dir is required');
  if (host !== '127.0.0.1' && host !== '::1' && host !== 'localhost') throw new Error('The mail catcher listens on loopback only.');
  mkdirSync(dir, { recursive: true });
  const indexFile = path.join(dir, 'index.json');
  let queue = Promise.resolve();

  const append = (entry) => {
    // One writer at a time, and a rename so that a reader never sees half a file.
    queue = queue.then(() => {
      const list = existsSync(indexFile) ? JSON.parse(readFileSync(indexFile, 'utf8')) : [];
      list.push(entry);
      const tmp = `${indexFile}.${process.pid}.tmp`;
      writeFileSync(tmp, JSON.stringify(list, null, 1));
      renameSync(tmp, indexFile);
    });
    return queue;
  };

  const server = new SMTPServer({
    name: 'ebbcast-mail-catcher',
    banner: 'Ebbcast local mail catcher',
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    onData(stream, session, callback) {
      const chunks = [];
      stream.on('data', (c) => chunks.push(c));
      stream.on('end', () => {
        if (stream.sizeExceeded) {
          const err = Object.assign(new Error('Message too large for the catcher'), { responseCode: 552 });
          callback(err);
          return;
        }
        const buf = Buffer.concat(chunks);
        const id = `${Date.now().toString(36)}-${randomUUID().slice(0, 8)}`;
        const file = `${id}.eml`;
        try {
          writeFileSync(path.join(dir, file), buf);
        } catch (err) {
          callback(err);
          return;
        }
        const entry = {
          id,
          file,
          receivedAt: new Date().toISOString(),
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to: session.envelope.rcptTo.map((r) => r.address),
          subject: rawSubject(buf),
          size: buf.length,
        };
        append(entry).then(() => callback(null, `Kept as ${id}`), (err) => callback(err));
      });
    },
  });

  await new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  server.on('error', (err) => {
    if (!quiet) console.error('mail catcher:', err.message);
  });
  const address = server.server.address();
  const actualPort = typeof address === 'object' && address ? address.port : port;
  return {
    host,
    port: actualPort,
    dir,
    url: `smtp://${host}:${actualPort}`,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

async function main(argv) {
  const sep = argv.indexOf('--');
  const own = sep >= 0 ? argv.slice(0, sep) : argv;
  const command = sep >= 0 ? argv.slice(sep + 1) : [];
  const opt = (name) => {
    const i = own.indexOf(name);
    return i >= 0 ? own[i + 1] : undefined;
  };
  const dataDir = path.resolve(process.env.EBBCAST_DATA_DIR || 'data');
  const dir = path.resolve(opt('--dir') || process.env.MAIL_CATCHER_DIR || path.join(dataDir, 'mail'));
  const port = Number(opt('--port') || process.env.MAIL_CATCHER_PORT || 0);
  const catcher = await startCatcher({ dir, port });
  console.log(`Mail catcher on ${catcher.url} (messages in ${dir})`);
  if (!command.length) return;
  const child = spawn(command[0], command.slice(1), {
    stdio: 'inherit',
    env: { ...process.env, SMTP_URL: catcher.url, MAIL_CATCHER_DIR: dir },
  });
  for (const sig of ['SIGINT', 'SIGTERM']) process.on(sig, () => child.kill(sig));
  child.on('exit', async (code) => {
    await catcher.close();
    process.exit(code ?? 0);
  });
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main(process.argv.slice(2)).catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
