package aislecast.core.sim;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Reproducibility, sizes and whole-or-nothing output of the written data set. */
class SimWriterTest {
  private static final SimSettings SMALL =
      SimSettings.demo().withSizes(5, 4, 7, 3, 3, 20).withSeed(42);

  @TempDir Path tmp;

  @Test
  void sameSeedGivesIdenticalBytes() throws IOException {
    SimWriter.write(DemandSimulator.simulate(SMALL), tmp.resolve("a"), false);
    SimWriter.write(DemandSimulator.simulate(SMALL), tmp.resolve("b"), false);
    for (String f : SimWriter.FILES) {
      assertArrayEquals(Files.readAllBytes(tmp.resolve("a").resolve(f)),
          Files.readAllBytes(tmp.resolve("b").resolve(f)), f);
    }
  }

  @Test
  void differentSeedGivesDifferentData() throws IOException {
    SimWriter.write(DemandSimulator.simulate(SMALL), tmp.resolve("a"), false);
    SimWriter.write(DemandSimulator.simulate(SMALL.withSeed(43)), tmp.resolve("b"), false);
    for (String f : List.of("sales.csv", "shopper_draws.csv", "truth.json", "stores.csv")) {
      assertFalse(java.util.Arrays.equals(Files.readAllBytes(tmp.resolve("a").resolve(f)),
          Files.readAllBytes(tmp.resolve("b").resolve(f))), f);
    }
  }

  @Test
  void sizesAndColumnsAreRespected() throws IOException {
    SimSettings st = SimSettings.demo().withSizes(7, 5, 9, 2, 4, 13).withSeed(5);
    Path out = tmp.resolve("sizes");
    SimWriter.write(DemandSimulator.simulate(st), out, false);

    List<String> stores = Files.readAllLines(out.resolve("stores.csv"));
    assertEquals("store_id,region,shoppers,median_income", stores.get(0));
    assertEquals(7, stores.size() - 1);

    List<String> products = Files.readAllLines(out.resolve("products.csv"));
    assertEquals("product_id,owner,sugar_free,caffeine_mg,volume_l,attr4", products.get(0));
    assertEquals(9, products.size() - 1);
    Set<String> owners = new HashSet<>();
    products.stream().skip(1).forEach(l -> owners.add(l.split(",")[1]));
    assertEquals(2, owners.size());

    List<String> draws = Files.readAllLines(out.resolve("shopper_draws.csv"));
    assertEquals("store_id,draw,nu0,nu1,nu2,nu3,nu4", draws.get(0));
    assertEquals(7 * 13, draws.size() - 1);

    List<String> sales = Files.readAllLines(out.resolve("sales.csv"));
    assertEquals("store_id,week,product_id,units,price,on_display,unit_cost", sales.get(0));
    Set<String> weeks = new HashSet<>();
    Set<String> seen = new HashSet<>();
    for (String line : sales.subList(1, sales.size())) {
      String[] f = line.split(",");
      assertEquals(7, f.length, line);
      weeks.add(f[1]);
      assertTrue(seen.add(f[0] + "|" + f[1] + "|" + f[2]), "duplicate row " + line);
      assertTrue(Long.parseLong(f[3]) >= 0);
      assertTrue(Double.parseDouble(f[4]) > 0);
      assertTrue(f[5].equals("0") || f[5].equals("1"));
      assertTrue(Double.parseDouble(f[6]) > 0);
    }
    assertEquals(5, weeks.size());
    assertTrue(weeks.contains("2026-01-05") && weeks.contains("2026-02-02"), weeks.toString());
    String truth = Files.readString(out.resolve("truth.json"));
    assertTrue(truth.contains("\"own_portfolio\": \"Brightwater Beverages\""));
    assertTrue(truth.contains("\"version\": \"" + DemandSimulator.VERSION + "\""));
  }

  @Test
  void existingOutputIsNotTouchedWithoutOverwrite() throws IOException {
    Path out = tmp.resolve("taken");
    Files.createDirectories(out);
    Files.writeString(out.resolve("keep.txt"), "mine");
    SimulatedData data = DemandSimulator.simulate(SMALL);
    assertThrows(FileAlreadyExistsException.class, () -> SimWriter.write(data, out, false));
    assertEquals("mine", Files.readString(out.resolve("keep.txt")));
    assertEquals(1, countEntries(out));
    assertEquals(1, countEntries(tmp), "no staging folder left behind");

    SimWriter.write(data, out, true);
    assertFalse(Files.exists(out.resolve("keep.txt")));
    assertEquals(SimWriter.FILES.size(), countEntries(out));
    assertEquals(1, countEntries(tmp), "no staging or old folder left behind");
  }

  @Test
  void emptyExistingFolderIsFilled() throws IOException {
    Path out = tmp.resolve("empty");
    Files.createDirectories(out);
    SimWriter.write(DemandSimulator.simulate(SMALL), out, false);
    assertEquals(SimWriter.FILES.size(), countEntries(out));
  }

  private static long countEntries(Path dir) throws IOException {
    try (Stream<Path> s = Files.list(dir)) {
      return s.count();
    }
  }
}
