export * from './users'
export * from './sessions'
export * from './mail'
export * from './audit'
