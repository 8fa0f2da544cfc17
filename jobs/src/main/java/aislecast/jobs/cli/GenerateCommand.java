package aislecast.jobs.cli;

import aislecast.core.sim.DemandSimulator;
import aislecast.core.sim.SimSettings;
import aislecast.core.sim.SimWriter;
import aislecast.core.sim.SimulatedData;
import java.io.IOException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

/**
 * {@code aislecast generate}: simulates a demo data set from the demand model with known
 * parameters (the chilled-drinks scenario of {@link SimSettings#demo()}, with sizes and seed
 * overridable) and writes the input tables plus truth.json. The output folder appears whole or
 * not at all.
 */
@Command(
    name = "generate",
    mixinStandardHelpOptions = true,
    sortOptions = false,
    description = {
      "Simulate a demo data set from the demand model with known parameters: sales.csv, "
          + "products.csv, stores.csv, shopper_draws.csv and truth.json (every true parameter).",
      "Defaults are the chilled-drinks demo scenario; the same options give the same bytes."
    },
    exitCodeListHeading = "Exit codes:%n",
    exitCodeList = {"0:written", "1:write failed", "2:bad arguments or output exists"})
public final class GenerateCommand implements Callable<Integer> {
  private static final SimSettings DEMO = SimSettings.demo();

  @Option(names = "--output", required = true, paramLabel = "DIR",
      description = "Folder to create (must not exist or be empty, unless --overwrite).")
  Path output;

  @Option(names = "--seed", paramLabel = "N",
      description = "Run seed (default ${DEFAULT-VALUE}: the bundled sample).")
  long seed = SimSettings.DEMO_SEED;

  @Option(names = "--stores", paramLabel = "N", description = "Stores (default ${DEFAULT-VALUE}).")
  int stores = DEMO.stores();

  @Option(names = "--weeks", paramLabel = "N", description = "Weeks (default ${DEFAULT-VALUE}).")
  int weeks = DEMO.weeks();

  @Option(names = "--products", paramLabel = "N", description = "Products (default ${DEFAULT-VALUE}).")
  int products = DEMO.products();

  @Option(names = "--owners", paramLabel = "N",
      description = "Owners; the first is the user's own portfolio (default ${DEFAULT-VALUE}).")
  int owners = DEMO.owners();

  @Option(names = "--attributes", paramLabel = "KX",
      description = "Product attributes in the model (default ${DEFAULT-VALUE}: sugar_free, "
          + "caffeine_mg, volume_l).")
  int attributes = DEMO.attributes();

  @Option(names = "--shoppers-draws", paramLabel = "R",
      description = "Shopper draws per store (default ${DEFAULT-VALUE}).")
  int draws = DEMO.draws();

  @Option(names = "--min-shoppers", paramLabel = "N",
      description = "Smallest weekly market size of a store (default ${DEFAULT-VALUE}).")
  int minShoppers = DEMO.shoppersMin();

  @Option(names = "--max-shoppers", paramLabel = "N",
      description = "Largest weekly market size of a store (default ${DEFAULT-VALUE}).")
  int maxShoppers = DEMO.shoppersMax();

  @Option(names = "--overwrite", description = "Replace an existing non-empty output folder.")
  boolean overwrite;

  @Override
  public Integer call() {
    SimSettings settings;
    try {
      settings = DEMO.withSeed(seed)
          .withSizes(stores, weeks, products, owners, attributes, draws)
          .withShoppers(minShoppers, maxShoppers);
    } catch (IllegalArgumentException e) {
      System.err.println("generate: " + e.getMessage());
      return 2;
    }
    if (!overwrite && Files.exists(output) && !isEmptyDirectory(output)) {
      System.err.println("generate: output " + output + " exists and is not empty; "
          + "pass --overwrite to replace it");
      return 2;
    }
    SimulatedData data = DemandSimulator.simulate(settings);
    List<Path> files;
    try {
      files = SimWriter.write(data, output, overwrite);
    } catch (FileAlreadyExistsException e) {
      System.err.println("generate: " + e.getFile() + ": " + e.getReason());
      return 2;
    } catch (IOException e) {
      System.err.println("generate: could not write " + output + ": " + e);
      return 1;
    }
    System.out.printf("generate: wrote %s (seed %d, %s)%n", output.toAbsolutePath().normalize(),
        settings.seed(), DemandSimulator.VERSION);
    long total = 0;
    for (Path f : files) {
      long bytes = size(f);
      total += bytes;
      System.out.printf("  %-18s %,12d bytes%n", f.getFileName(), bytes);
    }
    System.out.printf("  %-18s %,12d bytes%n", "total", total);
    Map<String, Object> summary = SimWriter.summary(data);
    System.out.printf("  %d stores x %d weeks, %d products (%d owners, own portfolio: %s), "
            + "Kx = %d, R = %d%n", settings.stores(), settings.weeks(), settings.products(),
        settings.owners(), data.ownerNames[0], settings.attributes(), settings.draws());
    for (Map.Entry<String, Object> e : summary.entrySet()) {
      System.out.printf("  %s: %s%n", e.getKey(), e.getValue());
    }
    return 0;
  }

  private static boolean isEmptyDirectory(Path p) {
    try (var s = Files.list(p)) {
      return s.findAny().isEmpty();
    } catch (IOException e) {
      return false;
    }
  }

  private static long size(Path f) {
    try {
      return Files.size(f);
    } catch (IOException e) {
      return -1;
    }
  }
}
