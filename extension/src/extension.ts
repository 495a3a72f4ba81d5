// Placeholder until the extension issue lands: the client that starts dist/server.cjs is not written yet.
export function activate(): void {}
export function deactivate(): void {}
