package dev.lawful.cli;

/**
 * A data file that is not what its reader accepts, with the whole message ready to print:
 * {@code FILE: line N, column 'NAME': detail} (or {@code row N} for binary formats).
 */
final class DataException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    /** @param message the whole message: file, place, column and what was expected and found */
    DataException(String message) {
        super(message);
    }

    /**
     * @param file   the file name as given
     * @param place  where, such as {@code line 7} (null when it is not one place)
     * @param column the column (null when it is not about one column)
     * @param detail what was expected and what was found
     * @return the exception
     */
    static DataException at(String file, String place, String column, String detail) {
        StringBuilder sb = new StringBuilder(file).append(": ");
        if (place != null) {
            sb.append(place);
            if (column != null) {
                sb.append(", column '").append(column).append('\'');
            }
            sb.append(": ");
        } else if (column != null) {
            sb.append("column '").append(column).append("': ");
        }
        return new DataException(sb.append(detail).toString());
    }
}
