//! Short lists that hold their first element or two in place: a net's drivers and loads.
//!
//! A board has about as many nets as pins, and most nets have one driver and a load or two:
//! each list keeps that many inside the net's model, and only a longer list takes a block
//! (a `ThinVec`, one pointer). Which of its forms a list is in is told by a value its
//! element can never hold (the compiler keeps the tag in a spare value of the element's
//! role), so a list of one in place is the size of its element rounded to a pointer, and a
//! list of two in place is the size of two. Both read as slices (`Deref<Target = [T]>`):
//! `len`, `iter`, `is_empty`, indexing and `for x in &list` work as on a `Vec`.

use std::ops::Deref;

use thin_vec::ThinVec;

/// A list holding its first element in place, any more in a block of their own.
#[derive(Debug, Clone)]
pub enum InPlace1<T> {
    One(T),
    /// Empty (no block) or two and more.
    Heap(ThinVec<T>),
}

impl<T> Default for InPlace1<T> {
    fn default() -> Self {
        InPlace1::Heap(ThinVec::new())
    }
}

impl<T> InPlace1<T> {
    /// A list for `n` elements: one or none take no block; more take one of that length.
    pub fn with_capacity(n: usize) -> Self {
        InPlace1::Heap(if n <= 1 {
            ThinVec::new()
        } else {
            ThinVec::with_capacity(n)
        })
    }

    #[inline]
    pub fn push(&mut self, x: T) {
        match self {
            InPlace1::Heap(v) if v.capacity() == 0 => *self = InPlace1::One(x),
            InPlace1::Heap(v) => v.push(x),
            InPlace1::One(_) => self.spill(x),
        }
    }

    /// The second element of a list that was not counted: the list moves to a block.
    #[cold]
    fn spill(&mut self, x: T) {
        let InPlace1::One(first) = std::mem::take(self) else {
            unreachable!("a list of one")
        };
        let mut v = ThinVec::with_capacity(2);
        v.push(first);
        v.push(x);
        *self = InPlace1::Heap(v);
    }

    /// Trims a block to its length; a list of one moves back in place, an empty one frees
    /// its block.
    pub fn shrink_to_fit(&mut self) {
        if let InPlace1::Heap(v) = self {
            match v.len() {
                0 => *self = InPlace1::default(),
                1 => {
                    let x = v.pop().expect("one element");
                    *self = InPlace1::One(x);
                }
                _ => v.shrink_to_fit(),
            }
        }
    }

    /// True when the list holds a block.
    pub fn spilled(&self) -> bool {
        matches!(self, InPlace1::Heap(v) if v.capacity() > 0)
    }
}

impl<T> Deref for InPlace1<T> {
    type Target = [T];
    #[inline]
    fn deref(&self) -> &[T] {
        match self {
            InPlace1::One(x) => std::slice::from_ref(x),
            InPlace1::Heap(v) => v,
        }
    }
}

impl<'a, T> IntoIterator for &'a InPlace1<T> {
    type Item = &'a T;
    type IntoIter = std::slice::Iter<'a, T>;
    fn into_iter(self) -> Self::IntoIter {
        self.iter()
    }
}

/// A list holding its first two elements in place, any more in a block of their own.
#[derive(Debug, Clone)]
pub enum InPlace2<T> {
    One(T),
    Two([T; 2]),
    /// Empty (no block) or three and more.
    Heap(ThinVec<T>),
}

impl<T> Default for InPlace2<T> {
    fn default() -> Self {
        InPlace2::Heap(ThinVec::new())
    }
}

impl<T> InPlace2<T> {
    /// A list for `n` elements: two or fewer take no block; more take one of that length.
    pub fn with_capacity(n: usize) -> Self {
        InPlace2::Heap(if n <= 2 {
            ThinVec::new()
        } else {
            ThinVec::with_capacity(n)
        })
    }

    #[inline]
    pub fn push(&mut self, x: T) {
        match self {
            InPlace2::Heap(v) if v.capacity() == 0 => *self = InPlace2::One(x),
            InPlace2::Heap(v) => v.push(x),
            InPlace2::One(_) => self.second(x),
            InPlace2::Two(_) => self.spill(x),
        }
    }

    /// The second element: the list holds two in place.
    #[inline]
    fn second(&mut self, x: T) {
        let InPlace2::One(first) = std::mem::take(self) else {
            unreachable!("a list of one")
        };
        *self = InPlace2::Two([first, x]);
    }

    /// The third element of a list that was not counted: the list moves to a block.
    #[cold]
    fn spill(&mut self, x: T) {
        let InPlace2::Two([a, b]) = std::mem::take(self) else {
            unreachable!("a list of two")
        };
        let mut v = ThinVec::with_capacity(4);
        v.push(a);
        v.push(b);
        v.push(x);
        *self = InPlace2::Heap(v);
    }

    /// Trims a block to its length; a list of two or fewer moves back in place, an empty
    /// one frees its block.
    pub fn shrink_to_fit(&mut self) {
        if let InPlace2::Heap(v) = self {
            match v.len() {
                0 => *self = InPlace2::default(),
                1 | 2 => {
                    let mut it = std::mem::take(v).into_iter();
                    let a = it.next().expect("a first element");
                    *self = match it.next() {
                        Some(b) => InPlace2::Two([a, b]),
                        None => InPlace2::One(a),
                    };
                }
                _ => v.shrink_to_fit(),
            }
        }
    }

    /// True when the list holds a block.
    pub fn spilled(&self) -> bool {
        matches!(self, InPlace2::Heap(v) if v.capacity() > 0)
    }
}

impl<T> Deref for InPlace2<T> {
    type Target = [T];
    #[inline]
    fn deref(&self) -> &[T] {
        match self {
            InPlace2::One(x) => std::slice::from_ref(x),
            InPlace2::Two(xs) => xs,
            InPlace2::Heap(v) => v,
        }
    }
}

impl<'a, T> IntoIterator for &'a InPlace2<T> {
    type Item = &'a T;
    type IntoIter = std::slice::Iter<'a, T>;
    fn into_iter(self) -> Self::IntoIter {
        self.iter()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Pushed one by one, each list reads back what was pushed, in order, at every length;
    /// trimmed, it still does, holding a block only beyond what it keeps in place.
    #[test]
    fn lists_read_back_what_was_pushed() {
        for n in 0..7usize {
            for counted in [0, n] {
                let mut one = InPlace1::with_capacity(counted);
                let mut two = InPlace2::with_capacity(counted);
                let mut want = Vec::new();
                for i in 0..n {
                    one.push(i * 10);
                    two.push(i * 10);
                    want.push(i * 10);
                    assert_eq!(&*one, &want[..]);
                    assert_eq!(&*two, &want[..]);
                }
                one.shrink_to_fit();
                two.shrink_to_fit();
                assert_eq!(&*one, &want[..]);
                assert_eq!(two.iter().copied().collect::<Vec<_>>(), want);
                assert_eq!(one.spilled(), n > 1, "{n}");
                assert_eq!(two.spilled(), n > 2, "{n}");
                if let InPlace1::Heap(v) = &one {
                    assert_eq!(v.capacity(), v.len());
                }
                if let InPlace2::Heap(v) = &two {
                    assert_eq!(v.capacity(), v.len());
                }
            }
        }
    }

    /// A list counted beforehand takes its block once, at its length.
    #[test]
    fn a_counted_list_takes_one_block_at_its_length() {
        let mut two = InPlace2::with_capacity(5);
        for i in 0..5 {
            two.push(i);
        }
        let InPlace2::Heap(v) = &two else {
            panic!("five are in a block")
        };
        assert_eq!(v.capacity(), 5);
    }
}
