namespace IdentityQueue.Cli.Tests;
