export function appDirectives(): string[];
export function appPolicy(): string;
export function apiHeaders(): { key: string; value: string }[];
export function unframedHeaders(): { key: string; value: string }[];
