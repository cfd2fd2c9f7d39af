import type { DataSource } from 'typeorm';
import { labSettingsUpdateSchema, templateActivationSchema } from '../../shared/settings/lab-settings';
import { thresholdSetRequestSchema } from '../../shared/settings/threshold-ranges';
import { auditContext } from '../audit/audit';
import { defaultRoleMap, type Config } from '../config';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow } from '../http/validate';
import { activateTemplateVersion, updateLabSettings } from '../settings/lab-settings';
import { defaultsFrom, templateChoice } from '../settings/queries/lab-settings';
import { readLabSettings, readRoleMapping, readTemplate, readTemplateChoice, readThresholds } from '../settings/read-settings';
import { createThresholdSet } from '../settings/thresholds';
import { listUsers } from '../users/list-users';

/** The admin's settings: thresholds with effective dates, lab settings, report templates, the role mapping; the user list. Every read and change is audited. */
export function adminRoutes({ config, dataSource }: { config: Config; dataSource: DataSource }): ApiRoute[] {
  const defaults = defaultsFrom(config);
  return [
    {
      method: 'get',
      path: '/admin/role-mapping',
      access: 'admin:manage',
      summary: 'The identity provider claim and the group → role table in force (read only: set by ROLE_CLAIM and ROLE_MAP)',
      handlers: [
        async (req, res) => {
          res.json(await readRoleMapping(dataSource, config.oidc, defaultRoleMap, auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/admin/thresholds',
      access: 'admin:manage',
      summary: 'Every cut-off with its source, the value in force and since when; the sets scheduled and past',
      handlers: [
        async (req, res) => {
          res.json(await readThresholds(dataSource, auditContext(req)));
        },
      ],
    },
    {
      method: 'post',
      path: '/admin/thresholds',
      access: 'admin:manage',
      summary: 'A new set of thresholds from an effective date (today or later) for studies signed from then on',
      handlers: [
        async (req, res) => {
          const body = parseOrThrow(thresholdSetRequestSchema, req.body);
          res.status(201).json(await createThresholdSet(dataSource, body, auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/admin/lab-settings',
      access: 'admin:manage',
      summary: 'The lab settings stored, what applies (configuration where nothing is stored) and who changed them last',
      handlers: [
        async (req, res) => {
          res.json(await readLabSettings(dataSource, defaults, auditContext(req)));
        },
      ],
    },
    {
      method: 'put',
      path: '/admin/lab-settings',
      access: 'admin:manage',
      summary: 'Change the time zone, signature target, EHR endpoint or mail sender (the version read must still be current)',
      handlers: [
        async (req, res) => {
          const body = parseOrThrow(labSettingsUpdateSchema, req.body);
          res.json(await updateLabSettings(dataSource, body, auditContext(req), defaults));
        },
      ],
    },
    {
      method: 'get',
      path: '/admin/report-templates',
      access: 'admin:manage',
      summary: 'The report template versions shipped, and the one new signatures use',
      handlers: [
        async (req, res) => {
          res.json(await readTemplateChoice(dataSource, defaults, auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/admin/report-templates/:version',
      access: 'admin:manage',
      summary: 'One shipped template version with the text of each file',
      handlers: [
        async (req, res) => {
          res.json(await readTemplate(dataSource, String(req.params.version), auditContext(req)));
        },
      ],
    },
    {
      method: 'post',
      path: '/admin/report-templates/active',
      access: 'admin:manage',
      summary: 'Activate a shipped template version for new previews and signatures; signed versions keep theirs',
      handlers: [
        async (req, res) => {
          const body = parseOrThrow(templateActivationSchema, req.body);
          await activateTemplateVersion(dataSource, body.version, auditContext(req), defaults);
          res.json(await templateChoice(dataSource, defaults));
        },
      ],
    },
    {
      method: 'get',
      path: '/admin/users',
      access: 'admin:manage',
      summary: 'Everyone who has an account, with their role',
      handlers: [
        async (req, res) => {
          res.json(await listUsers(dataSource, auditContext(req)));
        },
      ],
    },
  ];
}
