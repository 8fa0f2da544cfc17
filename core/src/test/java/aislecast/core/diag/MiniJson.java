package aislecast.core.diag;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * Just enough JSON (RFC 8259) to read the test fixture: objects become {@link Map}, arrays {@link
 * List}, numbers {@link Double}, plus strings, booleans and null. Written here because core has no
 * JSON library on its test classpath; it rejects anything it does not understand.
 */
final class MiniJson {
  private final String text;
  private int pos;

  private MiniJson(String text) {
    this.text = text;
  }

  static Object parse(String text) {
    MiniJson parser = new MiniJson(text);
    Object value = parser.value();
    parser.skipSpace();
    if (parser.pos != text.length()) {
      throw parser.error("trailing characters");
    }
    return value;
  }

  private Object value() {
    skipSpace();
    if (pos >= text.length()) {
      throw error("unexpected end");
    }
    char c = text.charAt(pos);
    switch (c) {
      case '{':
        return object();
      case '[':
        return array();
      case '"':
        return string();
      case 't':
        return literal("true", Boolean.TRUE);
      case 'f':
        return literal("false", Boolean.FALSE);
      case 'n':
        return literal("null", null);
      default:
        return number();
    }
  }

  private Map<String, Object> object() {
    Map<String, Object> map = new LinkedHashMap<>();
    pos++;
    skipSpace();
    if (peek() == '}') {
      pos++;
      return map;
    }
    while (true) {
      skipSpace();
      String key = string();
      skipSpace();
      expect(':');
      map.put(key, value());
      skipSpace();
      if (peek() == ',') {
        pos++;
      } else {
        expect('}');
        return map;
      }
    }
  }

  private List<Object> array() {
    List<Object> list = new ArrayList<>();
    pos++;
    skipSpace();
    if (peek() == ']') {
      pos++;
      return list;
    }
    while (true) {
      list.add(value());
      skipSpace();
      if (peek() == ',') {
        pos++;
      } else {
        expect(']');
        return list;
      }
    }
  }

  private String string() {
    expect('"');
    StringBuilder sb = new StringBuilder();
    while (true) {
      if (pos >= text.length()) {
        throw error("unterminated string");
      }
      char c = text.charAt(pos++);
      if (c == '"') {
        return sb.toString();
      }
      if (c != '\\') {
        sb.append(c);
        continue;
      }
      char e = text.charAt(pos++);
      switch (e) {
        case '"', '\\', '/' -> sb.append(e);
        case 'b' -> sb.append('\b');
        case 'f' -> sb.append('\f');
        case 'n' -> sb.append('\n');
        case 'r' -> sb.append('\r');
        case 't' -> sb.append('\t');
        case 'u' -> {
          sb.append((char) Integer.parseInt(text.substring(pos, pos + 4), 16));
          pos += 4;
        }
        default -> throw error("bad escape \\" + e);
      }
    }
  }

  private Double number() {
    int start = pos;
    while (pos < text.length() && "+-0123456789.eE".indexOf(text.charAt(pos)) >= 0) {
      pos++;
    }
    if (start == pos) {
      throw error("unexpected character '" + text.charAt(pos) + "'");
    }
    return Double.valueOf(text.substring(start, pos));
  }

  private Object literal(String word, Object value) {
    if (!text.startsWith(word, pos)) {
      throw error("expected " + word);
    }
    pos += word.length();
    return value;
  }

  private void expect(char c) {
    if (peek() != c) {
      throw error("expected '" + c + "'");
    }
    pos++;
  }

  private char peek() {
    return pos < text.length() ? text.charAt(pos) : '\0';
  }

  private void skipSpace() {
    while (pos < text.length() && Character.isWhitespace(text.charAt(pos))) {
      pos++;
    }
  }

  private IllegalArgumentException error(String message) {
    return new IllegalArgumentException("JSON: " + message + " at offset " + pos);
  }
}
