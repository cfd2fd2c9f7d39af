import type { DataSource } from 'typeorm';
import { roleLabel } from '../../shared/auth/permissions';
import type { RoleMapping } from '../../shared/settings/admin';
import { labSettingsUpdateSchema, templateActivationSchema } from '../../shared/settings/lab-settings';
import { thresholdSetRequestSchema } from '../../shared/settings/threshold-ranges';
import { auditContext, recordAudit } from '../audit/audit';
import { defaultRoleMap, type Config } from '../config';
import { NotFoundError } from '../http/problem';
import type { ApiRoute } from '../http/routes';
import type { Request } from 'express';
import { parseOrThrow } from '../http/validate';
import { listTemplateVersions, readTemplateVersion } from '../report/template-versions';
import { activateTemplateVersion, defaultsFrom, labSettings, labSettingsView, updateLabSettings } from '../settings/lab-settings';
import { createThresholdSet, thresholdOverview } from '../settings/thresholds';

/** The admin's settings: thresholds with effective dates, lab settings, report templates, the role mapping. Every change is audited. */
export function adminRoutes({ config, dataSource }: { config: Config; dataSource: DataSource }): ApiRoute[] {
  const defaults = defaultsFrom(config);
  // Reading the lab's settings is audited too: the trail answers who looked at what, not only who changed it.
  const auditRead = (req: Request, entityId: string, extra: Record<string, unknown> = {}) =>
    recordAudit(dataSource, { ...auditContext(req), action: 'read', entityType: 'settings', entityId, outcome: 'success', ...(Object.keys(extra).length ? { detail: extra } : {}) });
  return [
    {
      method: 'get',
      path: '/admin/role-mapping',
      access: 'admin:manage',
      summary: 'The identity provider claim and the group → role table in force (read only: set by ROLE_CLAIM and ROLE_MAP)',
      handlers: [
        async (req, res) => {
          await auditRead(req, 'role-mapping');
          const body: RoleMapping = {
            claim: config.oidc.roleClaim,
            rules: Object.entries(config.oidc.roleMap).map(([group, role]) => ({ group, role, roleLabel: roleLabel[role] })),
            isDefault: JSON.stringify(config.oidc.roleMap) === JSON.stringify(defaultRoleMap),
          };
          res.json(body);
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
          const overview = await thresholdOverview(dataSource);
          await auditRead(req, 'thresholds');
          res.json(overview);
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
          const view = await labSettingsView(dataSource, defaults);
          await auditRead(req, 'lab-settings');
          res.json(view);
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
          const body = { active: (await labSettings(dataSource, defaults)).templateVersion, versions: listTemplateVersions() };
          await auditRead(req, 'report-templates');
          res.json(body);
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
          const detail = readTemplateVersion(String(req.params.version));
          if (!detail) throw new NotFoundError(`No report template version "${String(req.params.version).slice(0, 20)}" is shipped.`);
          await auditRead(req, 'report-template', { version: detail.version });
          res.json(detail);
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
          res.json({ active: (await labSettings(dataSource, defaults)).templateVersion, versions: listTemplateVersions() });
        },
      ],
    },
  ];
}
