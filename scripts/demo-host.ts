import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';

/**
 * Serve public/samples/host-page.html from a second local origin (default
 * http://localhost:4000) with the demo calculator's token filled in, to see the
 * calculator framed by "another website":
 *
 *   npx tsx scripts/demo-host.ts [--port 4000] [--app http://localhost:3000] [--token TOKEN]
 *
 * Without --token, the demo workspace's first calculator is read from DATABASE_URL.
 */
function arg(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] : undefined;
}

async function demoToken(): Promise<string> {
  const { DEMO_WORKSPACE } = await import('@/lib/demo/accounts');
  const m = await import('@/models');
  const workspace = await m.Workspace.findOne({ where: { slug: DEMO_WORKSPACE.slug } });
  const embed = workspace && (await m.Embed.findOne({ where: { workspaceId: workspace.id, status: 'active' }, order: [['id', 'ASC']] }));
  await m.sequelize.close();
  if (!embed) throw new Error('No demo calculator yet: run `npm run db:seed` (or `npm start` once), or pass --token.');
  return embed.token;
}

async function main() {
  const port = Number(arg('port') ?? 4000);
  const app = (arg('app') ?? process.env.NEXTAUTH_URL ?? 'http://localhost:3000').replace(/\/$/, '');
  const token = arg('token') ?? (await demoToken());
  const template = fs.readFileSync(path.resolve('public/samples/host-page.html'), 'utf8');
  const page = template.replaceAll('{{TOKEN}}', token).replaceAll('{{APP_URL}}', app);
  http
    .createServer((req, res) => {
      if (req.url !== '/' && req.url !== '/index.html') {
        res.writeHead(404).end('not found');
        return;
      }
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' }).end(page);
    })
    .listen(port, '127.0.0.1', () => console.log(`demo host page: http://localhost:${port}/ (calculator from ${app})`));
}

main().catch((e) => {
  console.error(e.message ?? e);
  process.exit(1);
});
