/** The HTTP API contract shared by server and client. */
export * from './common';
export * from './auth';
export * from './workspaces';
export * from './notebooks';
export * from './system';
export * from './routes';
