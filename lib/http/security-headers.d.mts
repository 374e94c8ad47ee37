export declare const SECURITY_HEADERS: { key: string; value: string }[];
export declare const API_CSP: string;
export declare function pageCsp(nonce: string, dev: boolean): string;
