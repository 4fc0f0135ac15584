// One import for the app: `import { designDetailSchema, type DesignDetail } from '@/lib/contracts'`.
export * from './common';
export * from './auth';
export * from './designs';
export * from './reviews';
export * from './team';
