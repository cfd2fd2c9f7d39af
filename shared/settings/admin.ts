import type { Role } from '../auth/permissions';

/** The identity provider's claim that carries a person's groups, and the groups → role table, in order of precedence. */
export interface RoleMapping {
  claim: string;
  rules: Array<{ group: string; role: Role; roleLabel: string }>;
  /** Whether the table is the built-in example (no ROLE_MAP configured). */
  isDefault: boolean;
}

export interface TemplateVersionSummary {
  version: string;
  description: string | null;
  files: number;
}

export interface TemplateVersionList {
  active: string;
  versions: TemplateVersionSummary[];
}

export interface TemplateVersionDetail extends TemplateVersionSummary {
  sources: Array<{ medium: 'html' | 'text'; name: string; text: string }>;
}
