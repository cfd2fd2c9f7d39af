// Metro's settings for the web build: Expo's defaults, with zod's message translations left out.
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);

// zod re-exports every language's error messages (`z.locales`, some 270 KB of the bundle) from its
// main entry, so they would all ride in the first load. The screens show their own messages and use
// zod's English default only: the locale index resolves to a module that offers English alone.
const zodLocaleIndex = /^\.\.\/locales\/index\.c?js$/;
const insideZod = /[\\/]node_modules[\\/]zod[\\/]/;
const englishOnly = path.join(__dirname, 'metro', 'zod-locales-english.js');
const defaultResolve = config.resolver.resolveRequest;
config.resolver.resolveRequest = (context, moduleName, platform) => {
  if (zodLocaleIndex.test(moduleName) && insideZod.test(context.originModulePath)) {
    return { type: 'sourceFile', filePath: englishOnly };
  }
  return (defaultResolve ?? context.resolveRequest)(context, moduleName, platform);
};

module.exports = config;
