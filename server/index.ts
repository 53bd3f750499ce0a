import { createApp } from './app';
import { ConfigError, loadConfig } from './config';

async function main() {
  let config;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(2);
    }
    throw err;
  }
  const { app, close, ctx } = await createApp(config);
  const server = app.listen(config.port, config.host, () => {
    const address = server.address();
    const port = typeof address === 'object' && address ? address.port : config.port;
    ctx.log(`Listening on http://localhost:${port} (${config.env}, database ${config.databaseUrl.split('@').pop()})`);
  });
  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) return;
    stopping = true;
    ctx.log(`${signal} received, shutting down.`);
    server.close(() => {
      close().then(
        () => process.exit(0),
        (err) => {
          console.error(err);
          process.exit(1);
        },
      );
    });
    setTimeout(() => process.exit(1), 10_000).unref();
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((err) => {
  console.error('[rholog] start-up failed:', err);
  process.exit(1);
});
