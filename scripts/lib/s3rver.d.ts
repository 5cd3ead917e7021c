/** The part of s3rver (the local S3-compatible fake, which ships no types) that fake-s3.server.ts uses. */
declare module "s3rver" {
  import type { AddressInfo } from "node:net";

  type Options = {
    address?: string;
    port?: number;
    directory: string;
    silent?: boolean;
    resetOnClose?: boolean;
    configureBuckets?: { name: string; configs?: string[] }[];
  };
  export default class S3rver {
    constructor(options: Options);
    run(): Promise<AddressInfo>;
    close(): Promise<void>;
  }
}
