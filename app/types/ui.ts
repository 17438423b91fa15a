/** Names of the line icons AppIcon can draw. */
export type IconName = 'check' | 'off' | 'clock' | 'caution' | 'error' | 'info' | 'arrow' | 'mail' | 'people' | 'external' | 'pencil' | 'upload' | 'download' | 'spark' | 'pin' | 'turn'
