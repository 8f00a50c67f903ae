export declare const FAKE_S3_CREDENTIALS: { accessKeyId: string, secretAccessKey: string }
export interface FakeS3 {
  port: number
  endpoint: string
  bucket: string
  directory: string
  state: { down: boolean, requests: number }
  /** S3_BUCKET, S3_ENDPOINT, S3_REGION, S3_FORCE_PATH_STYLE, S3_ACCESS_KEY_ID, S3_SECRET_ACCESS_KEY for the app. */
  env: Record<string, string>
  setDown: (down: boolean) => void
  close: () => Promise<void>
}
export declare function startFakeS3(opts: { port?: number, host?: string, bucket?: string, directory: string, quiet?: boolean }): Promise<FakeS3>
