export declare const MAX_MESSAGES: number
export interface FakeSmtp { smtpPort: number, httpPort: number, close: () => Promise<void> }
export declare function startFakeSmtp(opts?: { smtpPort?: number, httpPort?: number, host?: string, quiet?: boolean }): Promise<FakeSmtp>
