export { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/db/demo'
