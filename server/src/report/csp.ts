import { randomBytes } from "node:crypto";

/**
 * Content-Security-Policy of the report. Nothing may load from anywhere (`default-src 'none'`); the one
 * style sheet and, in the editor's panel, the one small script run only because they carry the nonce.
 * There is no `unsafe-eval` and no `unsafe-inline`: the plots are inline SVG drawn ahead of time, with no
 * script of their own. Images are limited to `data:` URIs, which the report itself does not use.
 */
export function contentSecurityPolicy(nonce: string, options: { readonly script: boolean }): string {
  const parts = ["default-src 'none'", "img-src data:", `style-src 'nonce-${nonce}'`];
  if (options.script) parts.push(`script-src 'nonce-${nonce}'`);
  parts.push("base-uri 'none'", "form-action 'none'");
  return parts.join("; ") + ";";
}

/** A fresh nonce: 128 random bits in base64, as the CSP specification recommends (at least 128 bits). */
export function createNonce(): string {
  return randomBytes(16).toString("base64");
}
