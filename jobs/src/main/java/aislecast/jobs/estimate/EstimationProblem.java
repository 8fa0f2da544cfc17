package aislecast.jobs.estimate;

import aislecast.core.demand.Heterogeneity;
import aislecast.core.globals.Dims;
import aislecast.core.model.ProductCatalog;
import aislecast.core.model.StoreData;
import java.nio.charset.StandardCharsets;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.util.HexFormat;
import java.util.List;

/**
 * What estimation runs on, built from the validated input: the product catalog, every store's
 * data in store-index order, and the sizes of the global blocks.
 *
 * @param stores ordered by {@link StoreData#storeIndex} (0, 1, ...)
 * @param demographicNames demographic columns in d_s after the leading 1, standardised
 * @param demandShifters names of z
 * @param costShifters names of c (entering as logs)
 * @param drawsSource "shopper_draws table" or "generated (R = ...)"
 * @param notes things the user should know (dropped columns, products without sales)
 */
public record EstimationProblem(
    ProductCatalog catalog,
    List<StoreData> stores,
    List<String> demographicNames,
    List<String> demandShifters,
    List<String> costShifters,
    String drawsSource,
    List<String> notes) {

  public EstimationProblem {
    stores = List.copyOf(stores);
    for (int i = 0; i < stores.size(); i++) {
      if (stores.get(i).storeIndex != i) {
        throw new IllegalArgumentException("stores must be in store-index order");
      }
    }
    demographicNames = List.copyOf(demographicNames);
    demandShifters = List.copyOf(demandShifters);
    costShifters = List.copyOf(costShifters);
    notes = List.copyOf(notes);
  }

  public int kd() {
    return 1 + demographicNames.size();
  }

  public int kz() {
    return demandShifters.size();
  }

  public int kc() {
    return costShifters.size();
  }

  public int kx() {
    return catalog.attributes();
  }

  public Dims dims() {
    return new Dims(kd(), Heterogeneity.dim(kx()), catalog.size(), kz(), kc());
  }

  public long rows() {
    long n = 0;
    for (StoreData d : stores) {
      n += d.rows();
    }
    return n;
  }

  /**
   * Names of psi's components (DESIGN section 4 order): {@code a, log_sigma, log_L11 ..
   * log_LKK, then L21, L31, L32, ...} (1-based attribute numbers, as in the design).
   */
  public static String[] psiNames(int kx) {
    String[] out = new String[Heterogeneity.dim(kx)];
    out[0] = "a";
    out[1] = "log_sigma";
    for (int k = 0; k < kx; k++) {
      out[2 + k] = "log_L" + (k + 1) + (k + 1);
    }
    for (int row = 1; row < kx; row++) {
      for (int col = 0; col < row; col++) {
        out[Heterogeneity.offDiagonalIndex(kx, row, col)] = "L" + (row + 1) + (col + 1);
      }
    }
    return out;
  }

  /**
   * A digest of everything the draws depend on in the data (store layout, every number the
   * sampler reads), so a resumed or warm-started run can tell whether it sees the same problem.
   */
  public String fingerprint() {
    try {
      MessageDigest md = MessageDigest.getInstance("SHA-256");
      StringBuilder head = new StringBuilder();
      head.append(dims()).append('|').append(String.join(",", demographicNames)).append('|')
          .append(String.join(",", demandShifters)).append('|')
          .append(String.join(",", costShifters));
      for (int p = 0; p < catalog.size(); p++) {
        head.append('|').append(catalog.id(p));
      }
      md.update(head.toString().getBytes(StandardCharsets.UTF_8));
      java.nio.ByteBuffer buf = java.nio.ByteBuffer.allocate(8);
      for (StoreData d : stores) {
        md.update(d.storeId.getBytes(StandardCharsets.UTF_8));
        md.update(String.join(",", d.weeks).getBytes(StandardCharsets.UTF_8));
        for (double v : d.demographics) {
          md.update(buf.clear().putDouble(v).array());
        }
        for (double v : d.nu) {
          md.update(buf.clear().putDouble(v).array());
        }
        for (int r = 0; r < d.rows(); r++) {
          md.update(buf.clear().putLong(((long) d.product[r] << 32) ^ d.units[r]).array());
          md.update(buf.clear().putDouble(d.price[r]).array());
        }
        for (double v : d.z) {
          md.update(buf.clear().putDouble(v).array());
        }
        for (double v : d.c) {
          md.update(buf.clear().putDouble(v).array());
        }
        for (long m : d.marketSize) {
          md.update(buf.clear().putLong(m).array());
        }
      }
      return HexFormat.of().formatHex(md.digest());
    } catch (NoSuchAlgorithmException e) {
      throw new IllegalStateException("SHA-256 is missing from this JVM", e);
    }
  }
}
