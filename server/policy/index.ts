export * from './rules'
export * from './scopes'
