//! Closed sets of choices known by a fixed name each — kinds of kernel, tuning methods, scores,
//! ways of freezing, run phases, run options — written once, as enums, by [`named!`].
//!
//! The name is the enum's only text form: it is what the command line accepts, what the page's
//! form sends, and what reports and links carry. Parsing a name that is not in the set is an error
//! that lists the set, never a silent fallback.

/// A closed set of choices with one name each.
pub trait Named: Copy + Eq + 'static {
    /// Every choice, in the order they are listed to users.
    const ALL: &'static [Self];
    /// What one choice is, for messages ("sampler", "tuning method", …).
    const WHAT: &'static str;
    fn name(self) -> &'static str;

    /// The choice called `name`, or a message listing the names there are.
    fn from_name(name: &str) -> Result<Self, String> {
        Self::ALL.iter().copied().find(|c| c.name() == name).ok_or_else(|| {
            let names: Vec<&str> = Self::ALL.iter().map(|c| c.name()).collect();
            format!("unknown {} `{name}`: use {}", Self::WHAT, names.join(", "))
        })
    }
}

/// An enum of unit variants, each with its name, and everything a name gives: [`Named`],
/// `Display`, `FromStr` and serde (as the bare name).
///
/// ```
/// mixwell::named! {
///     /// Sizes of a coffee.
///     pub enum Size: "size" { Small = "small", Large = "large" }
/// }
/// use mixwell::names::Named;
/// assert_eq!("large".parse::<Size>(), Ok(Size::Large));
/// assert_eq!(Size::Small.to_string(), "small");
/// assert_eq!(Size::from_name("huge").unwrap_err(), "unknown size `huge`: use small, large");
/// ```
#[macro_export]
macro_rules! named {
    ($(#[$meta:meta])* $vis:vis enum $ty:ident : $what:literal {
        $($(#[$vmeta:meta])* $variant:ident = $name:literal),+ $(,)?
    }) => {
        $(#[$meta])*
        #[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
        $vis enum $ty { $($(#[$vmeta])* $variant),+ }

        impl $crate::names::Named for $ty {
            const ALL: &'static [Self] = &[$($ty::$variant),+];
            const WHAT: &'static str = $what;
            fn name(self) -> &'static str {
                match self { $($ty::$variant => $name),+ }
            }
        }

        impl ::std::fmt::Display for $ty {
            fn fmt(&self, f: &mut ::std::fmt::Formatter<'_>) -> ::std::fmt::Result {
                f.pad($crate::names::Named::name(*self))
            }
        }

        impl ::std::str::FromStr for $ty {
            type Err = String;
            fn from_str(name: &str) -> Result<Self, String> {
                <$ty as $crate::names::Named>::from_name(name)
            }
        }

        impl ::serde::Serialize for $ty {
            fn serialize<S: ::serde::Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
                serializer.serialize_str($crate::names::Named::name(*self))
            }
        }

        impl<'de> ::serde::Deserialize<'de> for $ty {
            fn deserialize<D: ::serde::Deserializer<'de>>(deserializer: D) -> Result<Self, D::Error> {
                let name = <String as ::serde::Deserialize>::deserialize(deserializer)?;
                <$ty as $crate::names::Named>::from_name(&name).map_err(::serde::de::Error::custom)
            }
        }
    };
}
