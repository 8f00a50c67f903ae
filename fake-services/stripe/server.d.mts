export declare const CARDS: { ok: string, declined: string, secondStep: string }
export interface FakeStripe { port: number, url: string, setWebhookUrl: (url: string) => void, close: () => Promise<void> }
export declare function signPayload(payload: string, secret: string, timestamp?: number): string
export declare function parseForm(body: string): Record<string, any>
export declare function startFakeStripe(opts?: { port?: number, host?: string, webhookUrl?: string, webhookSecret?: string, quiet?: boolean }): Promise<FakeStripe>
