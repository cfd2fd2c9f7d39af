/**
 * The hyperaemic agents and drug routes a study records. Kept apart from the schemas (and from zod),
 * so the screens that only name them, the worklist among them, load no validation code.
 */
export const hyperemicAgents = ['adenosine', 'papaverine', 'other', 'none'] as const;
export const drugRoutes = ['intravenous', 'intracoronary'] as const;
