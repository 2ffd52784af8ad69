// The engine version recorded with every analysis and reduced version: the package version of this
// checkout (the engine ships with the app; there is no separate engine release).
import packageJson from '../../package.json';

export const ENGINE_VERSION = `modeshelf-engine ${packageJson.version}`;
