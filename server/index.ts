import { createApp } from './app';
import { ConfigError, loadConfig } from './config';
import { createLogger } from './log';
import { applyRequestTimeouts, exposureWarnings } from './startup';

async function main() {
  // Files and folders Rholog creates (database, uploads) are closed to other users.
  process.umask(0o027);
  let config;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      process.stderr.write(`${err.message}\n`);
      process.exit(2);
    }
    throw err;
  }
  const { app, close, ctx, beginShutdown } = await createApp(config);
  for (const warning of exposureWarnings(config)) ctx.logger.warn({ host: config.host, demoData: config.demoData }, warning);
  // Express 5 calls this back with the error when the server cannot listen (the port is taken, the address is not
  // this machine's, a port below 1024 without the right): say so and stop, rather than report a start that did not happen.
  const server = app.listen(config.port, config.host, (err?: NodeJS.ErrnoException) => {
    if (err) {
      const why =
        err.code === 'EADDRINUSE'
          ? `port ${config.port} on ${config.host} is already in use by another program (set PORT to a free port)`
          : err.code === 'EADDRNOTAVAIL'
            ? `the address ${config.host} is not one of this machine's (check HOST)`
            : err.code === 'EACCES'
              ? `this user may not listen on port ${config.port} (ports below 1024 need extra rights; set PORT)`
              : err.message;
      process.stderr.write(`Rholog cannot start: ${why}.\n`);
      ctx.logger.fatal({ err, host: config.host, port: config.port }, `cannot listen: ${why}`);
      void close().finally(() => process.exit(1));
      return;
    }
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    ctx.logger.info(
      { host: config.host, port, env: config.env, database: config.databaseUrl.split('@').pop() },
      `Listening on http://${config.host === '0.0.0.0' ? 'localhost' : config.host}:${port} (${config.env})`,
    );
  });
  applyRequestTimeouts(server, config);
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    ctx.log(`${signal} received, shutting down.`);
    // /api/ready turns 503 at once; requests under way are answered; running jobs finish within the grace period
    // (SHUTDOWN_GRACE_S) or go back to the queue for another instance.
    beginShutdown();
    server.closeIdleConnections();
    server.close(() => {
      close().then(
        () => process.exit(0),
        (err) => {
          ctx.logger.error({ err }, 'shutdown failed');
          process.exit(1);
        },
      );
    });
    setTimeout(() => process.exit(1), config.jobs.shutdownGraceMs + 10_000).unref();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((err) => {
  createLogger({ logLevel: 'error' }).fatal({ err }, 'start-up failed');
  process.exit(1);
});
