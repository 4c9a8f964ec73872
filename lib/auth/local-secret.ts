import fs from 'node:fs';
import path from 'node:path';
import { randomBytes } from 'node:crypto';

/**
 * The session signing secret of a local run (`npm start` without NEXTAUTH_SECRET):
 * 32 random bytes made once and kept in the data directory, readable by its owner
 * only, so restarts keep people signed in and nobody else on the machine (or anyone
 * who has read the source) can sign a session. Not `server-only`: the app server
 * prepares it before Next loads.
 */
export const LOCAL_SECRET_FILE = 'session-secret';
/** Shortest secret accepted from the file (the generated one is 43 characters). */
export const MIN_SECRET_LENGTH = 32;

export class LocalSecretError extends Error {}

export function localSecretPath(env: Record<string, string | undefined> = process.env): string {
  return path.resolve(/*turbopackIgnore: true*/ env.PARTWISE_DATA_DIR || 'data', LOCAL_SECRET_FILE);
}

/** Read the file and check it is ours, a regular file, owner-only and long enough; throws LocalSecretError otherwise. */
export function readLocalSecret(file: string = localSecretPath()): string {
  let fd: number;
  try {
    // O_NOFOLLOW: a symlink planted in the data directory is refused, not followed.
    fd = fs.openSync(/*turbopackIgnore: true*/ file, fs.constants.O_RDONLY | fs.constants.O_NOFOLLOW);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new LocalSecretError(`the local session secret ${file} does not exist.`);
    if (code === 'ELOOP') throw new LocalSecretError(`the local session secret ${file} is a symbolic link; it must be a plain file.`);
    throw new LocalSecretError(`the local session secret ${file} cannot be read (${(e as Error).message}).`);
  }
  try {
    const stat = fs.fstatSync(fd);
    if (!stat.isFile()) throw new LocalSecretError(`the local session secret ${file} is not a plain file.`);
    const uid = process.getuid?.();
    if (uid !== undefined && stat.uid !== uid) throw new LocalSecretError(`the local session secret ${file} belongs to another user (uid ${stat.uid}).`);
    const loose = stat.mode & 0o077;
    if (loose) throw new LocalSecretError(`the local session secret ${file} is readable by others (mode ${(stat.mode & 0o777).toString(8)}); it must be 600.`);
    const secret = fs.readFileSync(fd, 'utf8').trim();
    if (secret.length < MIN_SECRET_LENGTH) throw new LocalSecretError(`the local session secret ${file} is too short (${secret.length} characters).`);
    return secret;
  } finally {
    fs.closeSync(fd);
  }
}

function writeNewSecret(file: string, replace: boolean): void {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const tmp = `${file}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`;
  // 'wx' + 0600 at creation: the secret is never on disk with wider permissions (umask only narrows).
  const fd = fs.openSync(tmp, 'wx', 0o600);
  try {
    fs.fchmodSync(fd, 0o600);
    fs.writeSync(fd, `${randomBytes(32).toString('base64url')}\n`);
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
  try {
    if (replace) fs.renameSync(tmp, file);
    else fs.linkSync(tmp, file); // fails if another process made one first: theirs is kept
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
  } finally {
    fs.rmSync(tmp, { force: true });
  }
}

/**
 * Make sure the local secret exists and is sound, creating it on the first run. A file
 * that others could read (or a damaged one) is replaced with a new secret, because its
 * value can no longer be trusted; this signs everyone out once. A file of another user
 * or a symbolic link is refused. Returns what happened, for the start-up log.
 */
export function ensureLocalSecret(file: string = localSecretPath()): { secret: string; action: 'kept' | 'created' | 'replaced'; reason?: string } {
  try {
    return { secret: readLocalSecret(file), action: 'kept' };
  } catch (e) {
    if (!(e instanceof LocalSecretError)) throw e;
    let stat: fs.Stats | null = null;
    try {
      stat = fs.lstatSync(file);
    } catch {
      stat = null;
    }
    if (!stat) {
      writeNewSecret(file, false);
      return { secret: readLocalSecret(file), action: 'created' };
    }
    const uid = process.getuid?.();
    if (stat.isSymbolicLink() || !stat.isFile() || (uid !== undefined && stat.uid !== uid)) throw e;
    writeNewSecret(file, true);
    return { secret: readLocalSecret(file), action: 'replaced', reason: e.message };
  }
}
