export * from './rules'
export * from './scopes'
export * from './work'
