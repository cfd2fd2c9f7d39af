// zod's locale index as the web bundle sees it: English only (see metro.config.cjs).
export { default as en } from 'zod/v4/locales/en.js';
