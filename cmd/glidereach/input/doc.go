// Package input turns the text of the command line and of user files into the
// SI values of the library packages: quantities with units, coordinates,
// aircraft profiles, wind specifications and forecast lines, fields, routes and
// areas.
//
// Every quantity is converted to SI at parse time with exact factors:
//
//	1 ft  = 0.3048 m            (international foot, 1959)
//	1 nm  = 1852 m              (international nautical mile)
//	1 kt  = 1852/3600 m/s
//	1 mph = 1609.344/3600 m/s
//	1 fpm = 0.3048/60 m/s       (feet per minute)
//	1 lb  = 0.45359237 kg
//
// A bare number is taken as SI. Errors a user can cause are returned as
// *UsageError, which the command maps to exit status 2.
package input
