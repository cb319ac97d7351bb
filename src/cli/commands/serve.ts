import { systemClock } from '../../clock.js';
import { loadConfig } from '../../config.js';
import { serve } from '../../server/serve.js';
import { UsageError, type Command } from '../command.js';

export const serveCommand: Command = {
  path: ['serve'],
  usage: '[--host 127.0.0.1] [--port 8080] [--no-demo] [--tls-cert FILE --tls-key FILE]',
  summary: 'start the server (imports the default food table on first start)',
  options: {
    host: { type: 'string' },
    port: { type: 'string' },
    'no-demo': { type: 'boolean' },
    'tls-cert': { type: 'string' },
    'tls-key': { type: 'string' },
  },
  async run(ctx) {
    const v = ctx.args.values;
    const port = typeof v.port === 'string' ? Number(v.port) : ctx.config.port;
    if (!Number.isInteger(port) || port < 0 || port > 65535)
      throw new UsageError('--port must be 0-65535');
    const config = loadConfig(process.env, {
      dbFile: ctx.config.dbFile,
      host: typeof v.host === 'string' ? v.host : ctx.config.host,
      port,
      seedDemo: v['no-demo'] ? false : ctx.config.seedDemo,
    });
    const tls = {
      tlsCert: typeof v['tls-cert'] === 'string' ? v['tls-cert'] : undefined,
      tlsKey: typeof v['tls-key'] === 'string' ? v['tls-key'] : undefined,
    };
    const server = await serve(
      config,
      systemClock,
      { stdout: ctx.stdout, stderr: ctx.stderr },
      tls,
    );
    await new Promise<void>((resolve) => {
      const stop = () => {
        void server.close().then(resolve);
      };
      process.once('SIGINT', stop);
      process.once('SIGTERM', stop);
    });
  },
};
