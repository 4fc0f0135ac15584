// The product version comes from package.json so that there is one place to bump it.
import pkg from '../package.json';

export const APP_VERSION: string = pkg.version;
