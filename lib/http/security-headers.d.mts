export function appPolicy(opts: { charts: boolean }): string;
export function apiHeaders(): { key: string; value: string }[];
export function unframedHeaders(): { key: string; value: string }[];
