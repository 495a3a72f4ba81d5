// Placeholder until the language-server issue lands: no LSP features are implemented yet.
process.stderr.write("trialbook: the language server is not implemented yet\n");
process.exit(1);
