// Types for the parts of s3rver 3.7.1 (a local S3-compatible fake, test-only) that the tests use.
declare module 's3rver' {
  interface S3rverOptions {
    address?: string;
    port?: number;
    silent?: boolean;
    directory?: string;
    resetOnClose?: boolean;
    allowMismatchedSignatures?: boolean;
    configureBuckets?: Array<{ name: string; configs: Array<string | Buffer> }>;
  }
  export default class S3rver {
    constructor(options?: S3rverOptions);
    run(): Promise<{ address: string; port: number; family: string }>;
    close(): Promise<void>;
  }
}
