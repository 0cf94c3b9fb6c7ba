// Types of minimize.mjs.
export function minimizeText(text: string, still: (text: string) => Promise<boolean>, budget?: number): Promise<string>;
