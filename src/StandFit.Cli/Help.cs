namespace StandFit.Cli;

/// <summary>The help texts of every command.</summary>
public static class Help
{
    public const string Main = """
        standfit - fits and rules end-of-line sensor sweeps as each part's recipe says.

        Usage: standfit <command> [options]

        Commands:
          run              process every sweep file now in the inbox (or --from DIR), then exit
          watch            the long-lived worker: watch the inbox and process files as they land
          inspect FILE     fit and rule one sweep file with no side effects
          recipes check P  validate a recipe file or a folder of recipes
          recipes explain PART  print the effective recipe of a part, after inheritance
          recipes schema   print the JSON Schema of the recipe language
          report           write the morning report (one HTML file) from an output folder's tables
          compact          merge each partition's small Parquet files into one, atomically

        Run 'standfit <command> --help' for a command's options. 'standfit --version' prints the version.
        Exit codes: 0 done, 1 invalid input (recipes check, inspect, report, compact), 2 usage, 3 configuration
        (compact: a table's lock is held), 4 output fault, 5 fatal (pass/fail log not writable).
        """;

    public const string Run = """
        Usage: standfit run [--config FILE] [--from DIR] [--shard I/N] [--quiet] [--stats]

        Processes every ready sweep file in the inbox, writes the summary Parquet and the pass/fail
        log, moves each input to archive/ or rejected/, prints one line per unit and the totals, and exits.

          --config FILE   the configuration (default: config/standfit.yaml)
          --from DIR      read the files of DIR in place instead of the inbox: they are never moved
                          or changed; copies go to archive/ or rejected/
          --shard I/N     take only shard I of N (0-based) of the files, chosen by a hash of the file
                          name: N processes or machines with I = 0 .. N-1 share one job, each file
                          judged by exactly one of them; each shard works as worker '<id>-shard-I-of-N'
          --quiet         print only the totals
          --stats         also print, on standard error, the time per stage (read, parse, fit,
                          diagnostics, resampling, judge, points, records, write, journal, log, move),
                          the rate and the peak working set

        On an interactive terminal, with --quiet or standard output redirected, one updating line
        on standard error shows the units done, the rate and the time left; the operations log gets
        a progress line (event 2010) every 10 seconds.
        """;

    public const string Watch = """
        Usage: standfit watch [--config FILE]

        The worker: watches the inbox (a file watcher wakes it, a rescan every 'watch.poll_seconds'
        catches what the watcher misses), processes files as they land, and stops cleanly on Ctrl-C or
        SIGTERM after finishing the unit in hand. Runs under systemd (Type=notify) and as a Windows service.

          --config FILE   the configuration (default: config/standfit.yaml)
        """;

    public const string Inspect = """
        Usage: standfit inspect FILE [--config FILE] [--recipe FILE] [--model MODEL] [--json]

        Fits and rules one sweep file and prints the result; writes nothing, moves nothing.

          --config FILE   the configuration whose recipes are matched (default: config/standfit.yaml)
          --recipe FILE   judge with this recipe file, whatever the unit's part
          --model MODEL   fit this model instead of the recipe's: straight-line,
                          straight-line-through-zero, or polynomial-K (K = 1..10)
          --json          print every field of the summary row as JSON
        """;

    public const string Report = """
        Usage: standfit report --output OUTPUT_FOLDER [--from DATE] [--to DATE] [--out FILE]

        Writes the morning report: one self-contained HTML file (inline SVG, no script, opens offline)
        with the yield by part, station and hour, the Pareto of reason codes, individuals charts of
        gain and offset per part with their flagged patterns, and each failed or retest unit with its
        curve, residuals and reasons. Reads the summary, point and run tables of OUTPUT_FOLDER.

          --output FOLDER  the output folder (the configuration's folders.output), holding summaries/
          --from DATE      the first date of test start to include, YYYY-MM-DD (UTC; default: the first)
          --to DATE        the last date to include, YYYY-MM-DD (default: the last)
          --out FILE       where to write the report (default: OUTPUT_FOLDER/reports/report-....html)
        """;

    public const string Compact = """
        Usage: standfit compact --output OUTPUT_FOLDER [--table TABLE] [--from DATE] [--to DATE]
                                [--min-age MINUTES] [--dry-run]

        Merges the small Parquet files of each date= partition (summaries, points) and of the runs
        folder into one file per folder, so that readers open few large files. Safe while workers
        write to the same folders: only published files last written at least --min-age ago are
        merged. On Linux each folder is swapped for the merged one in one step, so every reader, a
        plain DuckDB glob too, sees each row once; on Windows the merged file is renamed in and the
        inputs deleted, and a plain SQL reader must follow the reader rule (see docs/outputs.md).
        A kill at any step is resolved by the next compact.

          --output FOLDER    the output folder (the configuration's folders.output)
          --table TABLE      summaries, points, runs or all (default: all)
          --from DATE        the first partition date to compact, YYYY-MM-DD (default: the first)
          --to DATE          the last partition date to compact, YYYY-MM-DD (default: the last)
          --min-age MINUTES  leave files written less than this long ago (default 10; 0 to 10080)
          --dry-run          print what would be merged; change nothing

        Exit codes: 0 done (also when there was nothing to merge), 1 no output folder, 2 usage,
        3 another compact is running on a table, 4 a file could not be read or written (the folder is
        left as the next compact resolves it).
        """;

    public const string RecipesExplain = """
        Usage: standfit recipes explain PART [--config FILE | --recipes FOLDER]

        Prints the recipe that judges PART as it is in force after inheritance (a family's keys merged
        with the variant's), each value followed by the file and line it came from.
        """;

    public const string RecipesSchema = """
        Usage: standfit recipes schema

        Prints the JSON Schema of the recipe language (config/recipe.schema.json is this output), for
        YAML editors that complete keys and mark errors.
        """;

    public const string RecipesCheck = """
        Usage: standfit recipes check PATH

        Validates a recipe file, or every *.yaml / *.yml file of a folder. Prints each problem as
        file:line:column: message [code]. Exit code 0 when all are valid, 1 otherwise.
        """;
}
