export declare class UserFixableError extends Error {}
export declare function portFree(port: number, host?: string): Promise<boolean>;
export declare function freePort(host?: string): Promise<number>;
export declare function portHolder(port: number): { pid: number; cmdline: string[]; cwd: string } | null;
export declare function describeHolder(port: number, options?: { dataDir?: string }): string;
export declare function portTakenMessage(options: {
  service: string;
  port: number;
  host: string;
  variable: string;
  hint?: string;
  dataDir?: string;
}): string;
