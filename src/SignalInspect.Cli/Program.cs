return SignalInspect.Cli.Cli.Run(args, Console.Out, Console.Error);
