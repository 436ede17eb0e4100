using BenchmarkDotNet.Columns;
using BenchmarkDotNet.Configs;
using BenchmarkDotNet.Running;
using TaskPhrase.Benchmarks;

// Harness subcommands and long-running console modes first; anything else goes to BenchmarkDotNet
// (e.g. --filter '*Search*' --job short).
switch (args.FirstOrDefault())
{
    case "soak":
        return Soak.Run(args[1..]);
    case "concurrency":
        return ConcurrencyRun.Run(args[1..]);
    case "paired":
        PairedHarness.Run(args.Skip(1));
        return 0;
    case "sweep":
        SettingsSweep.Run(args.Skip(1));
        return 0;
    case "startup":
        StartupPhases.Run(args.Skip(1));
        return 0;
    case "coldstart":
        ColdStart.Run(args.Skip(1));
        return 0;
    case "int8-paired":
        Int8PairedHarness.Run(args.Skip(1));
        return 0;
    case "peers":
        PeerHarness.Run(args.Skip(1));
        return 0;
    case "peers-js":
        JsPeerHarness.Run(args.Skip(1));
        return 0;
    case "search":
        SearchHarness.Run(args.Skip(1));
        return 0;
    case "op-profile":
        OpProfile.Run(args.Skip(1));
        return 0;
    case "snapshot":
        BehaviourSnapshot.Run(args.Skip(1));
        return 0;
    default:
        // Median and minimum beside the mean: on a shared machine the minimum is the least disturbed run.
        var config = DefaultConfig.Instance.AddColumn(StatisticColumn.Median, StatisticColumn.Min);
        BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args, config);
        return 0;
}
