//! Column widths of a table fitted to a width: every column its widest cell when all fit;
//! else words kept whole where the room allows, and the room left to the columns that want
//! least. comfy-table then wraps each cell to its column.

use super::wrap::display_width;

/// Columns a table of `columns` columns spends on borders and padding (the preset draws a
/// border left and right and between columns; cells are padded one space each side).
fn overhead(columns: usize) -> usize {
    columns + 1 + PADDING * columns
}

/// Columns of padding in a cell of the preset (one space each side).
pub(crate) const PADDING: usize = 2;

pub(crate) fn longest_word(text: &str) -> usize {
    text.split(' ').map(display_width).max().unwrap_or(0)
}

/// Narrowest a column is cut to while other columns keep their words whole.
const WORD_FLOOR: usize = 6;

/// Least content widths that keep the longest word of every column whole, as far as `width`
/// allows. When they do not all fit beside the borders and padding, the columns with the
/// longest words are cut first, each down to [`WORD_FLOOR`], so that as few columns as possible
/// split a word; if that is still too wide, every column is cut to one common cap, the largest
/// that fits.
fn word_bounds(longest: &[usize], width: usize) -> Vec<usize> {
    let columns = longest.len();
    let room = width.saturating_sub(overhead(columns));
    let mut bounds: Vec<usize> = longest.iter().map(|&l| l.max(1)).collect();
    let mut excess = bounds.iter().sum::<usize>().saturating_sub(room);
    let mut order: Vec<usize> = (0..columns).collect();
    order.sort_by_key(|&j| std::cmp::Reverse(bounds.get(j).copied().unwrap_or(0)));
    for j in order {
        if excess == 0 {
            break;
        }
        if let Some(b) = bounds.get_mut(j) {
            let cut = b.saturating_sub(WORD_FLOOR).min(excess);
            *b -= cut;
            excess -= cut;
        }
    }
    if excess > 0 {
        let fits = |cap: usize| bounds.iter().map(|&b| b.min(cap)).sum::<usize>() <= room;
        let widest = bounds.iter().copied().max().unwrap_or(1);
        let cap = (1..=widest).rev().find(|&cap| fits(cap)).unwrap_or(1);
        bounds.iter_mut().for_each(|b| *b = (*b).min(cap));
    }
    bounds
}

/// Content widths of the columns of a table `width` columns wide: each column its natural
/// (widest cell) width when they all fit; else each at least its longest word as far as
/// [`word_bounds`] allows, and the room left given to the columns that want least first, so
/// that as many columns as possible show every cell on one line.
pub(crate) fn column_widths(natural: &[usize], longest: &[usize], width: usize) -> Vec<usize> {
    let columns = natural.len();
    let room = width.saturating_sub(overhead(columns));
    if natural.iter().sum::<usize>() <= room {
        return natural.to_vec();
    }
    let mut widths = word_bounds(longest, width);
    let mut left = room.saturating_sub(widths.iter().sum());
    let mut order: Vec<usize> = (0..columns).collect();
    let need = |w: &[usize], j: usize| {
        natural
            .get(j)
            .copied()
            .unwrap_or(0)
            .saturating_sub(w.get(j).copied().unwrap_or(0))
    };
    order.sort_by_key(|&j| need(&widths, j));
    for j in order {
        let give = need(&widths, j).min(left);
        if let Some(w) = widths.get_mut(j) {
            *w += give;
            left -= give;
        }
    }
    widths
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn columns_that_fit_keep_their_natural_width() {
        assert_eq!(column_widths(&[5, 10, 3], &[5, 4, 3], 80), vec![5, 10, 3]);
        // 18 of content + 4 borders + 6 padding = 28 exactly.
        assert_eq!(column_widths(&[5, 10, 3], &[5, 4, 3], 28), vec![5, 10, 3]);
    }

    #[test]
    fn short_columns_are_finished_first_and_the_long_one_wraps() {
        // A check table: four short columns and one long text.
        let natural = [17, 8, 8, 6, 200];
        let longest = [17, 8, 5, 3, 14];
        let widths = column_widths(&natural, &longest, 80);
        assert_eq!(widths, vec![17, 8, 8, 6, 25]);
        assert_eq!(widths.iter().sum::<usize>() + overhead(5), 80);
    }

    #[test]
    fn words_stay_whole_where_they_can_and_the_longest_give_way() {
        // 69 columns of longest words against 55 of room: the three longest words are cut to
        // the floor or above, every other column keeps its word.
        let longest = [10, 7, 12, 7, 9, 5, 8, 11];
        let bounds = word_bounds(&longest, 80);
        assert_eq!(bounds.iter().sum::<usize>(), 80 - overhead(8));
        assert_eq!(&bounds[3..8], &[7, 9, 5, 8, 6]);
        assert_eq!(&bounds[..3], &[7, 7, WORD_FLOOR]);
        // Far too narrow: one common cap, at least one column each.
        let bounds = word_bounds(&[40, 40, 40], 20);
        assert_eq!(bounds, vec![3, 3, 3]);
        assert_eq!(word_bounds(&[40, 40, 40], 3), vec![1, 1, 1]);
    }

    #[test]
    fn longest_word_counts_columns() {
        assert_eq!(longest_word("Tj max [°C]"), 4);
        assert_eq!(longest_word("温度 x"), 4);
        assert_eq!(longest_word(""), 0);
    }
}
