import { loadConfig } from '../config';
import { startFakeEhr } from './ehr';
import { startFakeIdp } from './identity-provider';
import { startFakeSmtp } from './smtp';

/**
 * Starts the local stand-ins for hospital services for `npm start`: the identity provider (with
 * Isobar's service client for the EHR), the EHR's FHIR endpoint on `FAKE_EHR_PORT`, and the mail relay
 * on `SMTP_PORT` (what it catches is listed on `FAKE_SMTP_HTTP_PORT`).
 */
async function main(): Promise<void> {
  const config = loadConfig();
  const issuer = new URL(config.oidc.issuer);
  const idp = await startFakeIdp({
    port: Number(issuer.port || 80),
    host: issuer.hostname,
    clientId: config.oidc.clientId,
    clientSecret: config.oidc.clientSecret,
    appUrl: config.publicUrl,
    serviceClients: [
      { clientId: config.ehr.clientId, clientSecret: config.ehr.clientSecret, audience: config.ehr.fhirBaseUrl, scope: config.ehr.scope },
    ],
  });
  console.log(`local identity provider at ${idp.issuer}`);
  const ehr = await startFakeEhr({ port: config.fakeEhrPort, issuer: idp.issuer, audience: config.ehr.fhirBaseUrl });
  console.log(`local EHR FHIR endpoint at ${ehr.fhirBaseUrl}`);
  const smtp = await startFakeSmtp({ port: config.mail.port, httpPort: config.mail.fakeHttpPort, host: config.mail.host });
  console.log(`local mail relay on port ${smtp.port}; caught mail at ${smtp.listUrl}`);
  const stop = () => void Promise.all([idp.close(), ehr.close(), smtp.close()]).then(() => process.exit(0));
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
