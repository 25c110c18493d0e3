//! Postman tours: Euler tours, Chinese and rural postman.
