// The bare app has no node_modules of its own: it resolves the repository's, so it is built with
// exactly the versions Isobar is built with.
const path = require('node:path');
const { getDefaultConfig } = require('expo/metro-config');

const repoRoot = path.resolve(__dirname, '../..');
const config = getDefaultConfig(__dirname);
config.watchFolders = [repoRoot];
config.resolver.nodeModulesPaths = [path.join(repoRoot, 'node_modules')];
module.exports = config;
