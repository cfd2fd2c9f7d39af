import { loadConfig } from '../config';
import { startFakeIdp } from './identity-provider';

/** Starts the local stand-ins for hospital services (identity provider) for `npm start`. */
async function main(): Promise<void> {
  const config = loadConfig();
  const port = Number(new URL(config.oidc.issuer).port || 80);
  const idp = await startFakeIdp({
    port,
    host: new URL(config.oidc.issuer).hostname,
    clientId: config.oidc.clientId,
    clientSecret: config.oidc.clientSecret,
    appUrl: config.publicUrl,
  });
  console.log(`local identity provider at ${idp.issuer}`);
  const stop = () => void idp.close().then(() => process.exit(0));
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
