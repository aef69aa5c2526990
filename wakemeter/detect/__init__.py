"""Wake detection: Radon transform and 2-D spectrum (numpy, scipy, OpenCV, scikit-image). No Qt; never imports synth."""
