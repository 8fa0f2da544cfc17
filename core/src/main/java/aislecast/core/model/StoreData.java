package aislecast.core.model;

import java.io.Serializable;

/**
 * Everything one store contributes to the likelihood, in flat arrays.
 *
 * <p>Markets (weeks) are numbered {@code 0..T-1}; the rows of market t are
 * {@code rowStart[t] .. rowStart[t+1]-1}, one per stocked product. Each row knows its product's
 * index in the {@link ProductCatalog} and in this store's own product list ({@code local}), which
 * indexes the store-product intercepts {@code kappa_sj}. Demand shifters {@code z} (Kz per row)
 * and cost shifters {@code c} (Kc per row, already in logs) are row-major.
 */
public final class StoreData implements Serializable {
  private static final long serialVersionUID = 1L;

  public final String storeId;
  public final int storeIndex;
  /** (1, demographics), length Kd. */
  public final double[] demographics;
  /** Shopper draws R x (1 + Kx). */
  public final double[] nu;
  public final int shoppers;
  /** Catalog indices of the products this store stocked in any week, ascending. */
  public final int[] products;
  public final String[] weeks;
  public final long[] marketSize;
  public final int[] rowStart;
  public final int[] product;
  public final int[] local;
  public final long[] units;
  public final double[] price;
  public final double[] logPrice;
  public final int kz;
  public final double[] z;
  public final int kc;
  public final double[] c;

  public StoreData(String storeId, int storeIndex, double[] demographics, double[] nu,
      int shoppers, int[] products, String[] weeks, long[] marketSize, int[] rowStart,
      int[] product, long[] units, double[] price, int kz, double[] z, int kc, double[] c) {
    int rows = product.length;
    if (rowStart.length != weeks.length + 1 || rowStart[weeks.length] != rows
        || units.length != rows || price.length != rows || z.length != rows * kz
        || c.length != rows * kc || marketSize.length != weeks.length) {
      throw new IllegalArgumentException("store " + storeId + ": arrays disagree in size");
    }
    this.storeId = storeId;
    this.storeIndex = storeIndex;
    this.demographics = demographics;
    this.nu = nu;
    this.shoppers = shoppers;
    this.products = products;
    this.weeks = weeks;
    this.marketSize = marketSize;
    this.rowStart = rowStart;
    this.product = product;
    this.units = units;
    this.price = price;
    this.kz = kz;
    this.z = z;
    this.kc = kc;
    this.c = c;
    this.logPrice = new double[rows];
    this.local = new int[rows];
    for (int i = 0; i < rows; i++) {
      logPrice[i] = Math.log(price[i]);
      int l = java.util.Arrays.binarySearch(products, product[i]);
      if (l < 0) {
        throw new IllegalArgumentException("store " + storeId + ": row product not in its list");
      }
      local[i] = l;
    }
  }

  public int markets() {
    return weeks.length;
  }

  public int rows() {
    return product.length;
  }

  /** Largest assortment over this store's markets. */
  public int maxAssortment() {
    int m = 0;
    for (int t = 0; t < markets(); t++) {
      m = Math.max(m, rowStart[t + 1] - rowStart[t]);
    }
    return m;
  }
}
