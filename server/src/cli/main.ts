// Placeholder: replaced by the CLI entry in the foundation work.
process.stderr.write("trialbook: no verbs implemented yet\n");
process.exit(2);
