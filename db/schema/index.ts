export * from './fleet';
export * from './telemetry';
export * from './health';
export * from './alerts';
export * from './devices';
export * from './people';
