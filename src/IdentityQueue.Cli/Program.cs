using System.CommandLine;
using IdentityQueue.Cli;

return CliApp.Run(args, Console.Out, Console.Error);
